/**
 * Units of observed columns: column densities (cm^-2), extinctions (mag),
 * integrated optical depths (cm^-1, tau integrated over wavenumber). The
 * spellings are those of the IVOA VOUnits recommendation and the CDS
 * standard for units (`cm-2`, `cm**-2`, `10+17cm-2`) and of everyday tables
 * (`cm^-2`, `/cm2`, `1e17 cm-2`).
 */
export type Dimension = 'column' | 'extinction' | 'tau' | 'none';

const BASES: Record<string, { dim: Dimension; factor: number }> = {
  'cm-2': { dim: 'column', factor: 1 },
  '/cm2': { dim: 'column', factor: 1 },
  '1/cm2': { dim: 'column', factor: 1 },
  'm-2': { dim: 'column', factor: 1e-4 },
  '/m2': { dim: 'column', factor: 1e-4 },
  '1/m2': { dim: 'column', factor: 1e-4 },
  mag: { dim: 'extinction', factor: 1 },
  'cm-1': { dim: 'tau', factor: 1 },
  '/cm': { dim: 'tau', factor: 1 },
  '1/cm': { dim: 'tau', factor: 1 },
  'm-1': { dim: 'tau', factor: 1e-2 },
  '/m': { dim: 'tau', factor: 1e-2 },
  '': { dim: 'none', factor: 1 },
};

/** What each dimension is called in messages and written in files. */
export const CANONICAL_UNIT: Record<Dimension, string> = { column: 'cm-2', extinction: 'mag', tau: 'cm-1', none: '(dimensionless)' };

/** A leading scale factor: `1e17`, `1.0E+17`, `10+17` (CDS), `10^17`, `10**17`. */
const SCALE = /^(?:10([+-]\d+)|10(?:\^|\*\*)\(?([+-]?\d+)\)?|(\d+(?:\.\d*)?(?:[eE][+-]?\d+)?))\s*\*?\s*(?=[^\d.]|$)/;

/** Parse a unit; undefined when it is not one of ours. */
export function parseUnit(unit: string): { dim: Dimension; factor: number } | undefined {
  let s = unit.trim();
  let scale = 1;
  const m = SCALE.exec(s);
  if (m && !(m[3] === '1' && s.startsWith('1/'))) {
    scale = m[3] !== undefined ? Number(m[3]) : 10 ** Number(m[1] ?? m[2]);
    s = s.slice(m[0].length);
  }
  const key = s
    .replace(/\s+/g, '')
    .replace(/\*\*|\^/g, '')
    .replace(/\(([+-]?\d+)\)/g, '$1')
    .replace(/^(molecules?|mol\.?)/i, '');
  const base = BASES[key] ?? BASES[key.toLowerCase()];
  if (!base) return undefined;
  if (base.dim === 'none' && scale !== 1) return undefined;
  return { dim: base.dim, factor: scale * base.factor };
}
