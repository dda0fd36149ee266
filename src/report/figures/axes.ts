/**
 * Axis titles with units, log-or-linear choice and decade labels shared by
 * the figure builders.
 */
import { decadeText, numberText } from '../numbers.ts';

/** Axis properties a log axis gets (merged into a Vega-Lite axis). */
export interface DecadeAxis {
  values?: number[];
  labelExpr?: string;
  format?: string;
}

/** A quantity spanning at least this ratio (max/min) gets a log axis: one decade. */
const LOG_AXIS_MIN_RATIO = 10;

/**
 * Human name and unit of every condition name (units as design.md fixes
 * them), for axis titles (`Gas temperature (K)`) and for values in text
 * (`gas temperature 10 K`).
 */
const PARAMETER_NAMES: Record<string, { name: string; unit: string; valueUnit?: string }> = {
  density: { name: 'Density', unit: 'cm⁻³' },
  age_yr: { name: 'Chemical age', unit: 'yr' },
  gas_temperature: { name: 'Gas temperature', unit: 'K' },
  dust_temperature: { name: 'Dust temperature', unit: 'K' },
  visual_extinction: { name: 'Model extinction', unit: 'mag' },
  cr_ionisation_rate: { name: 'Cosmic-ray ionisation rate', unit: 's⁻¹' },
  uv_field: { name: 'UV field', unit: 'G0, Habing', valueUnit: 'G0' },
  diffusion_ratio: { name: 'Diffusion-to-binding energy ratio', unit: '' },
  grain_radius: { name: 'Grain radius', unit: 'µm' },
  dust_to_gas: { name: 'Dust-to-gas mass ratio', unit: '' },
  reactive_desorption: { name: 'Reactive desorption fraction', unit: '' },
  grain_density: { name: 'Grain material density', unit: 'g cm⁻³' },
  site_density: { name: 'Surface site density', unit: 'cm⁻²' },
  photodesorption_yield: { name: 'Photodesorption yield', unit: 'per photon' },
  // Physical-track parameters on grid axes (src/config/sections/track.ts, TRACK_PARAMETERS).
  final_density: { name: 'Final density of the collapse', unit: 'cm⁻³' },
  retardation: { name: 'Collapse retardation factor B', unit: '' },
  final_temperature: { name: 'Final warm-up temperature', unit: 'K' },
  duration_yr: { name: 'Warm-up duration', unit: 'yr' },
};

export const AV_TITLE = 'Visual extinction (mag)';
export const DELTA_CHI2_TITLE = 'Δχ²';
export const CHI2_TITLE = 'χ²';

/** Axis title: `Gas temperature (K)`; an unknown name as written. */
export function parameterTitle(name: string): string {
  const p = PARAMETER_NAMES[name];
  if (!p) return name;
  return p.unit ? `${p.name} (${p.unit})` : p.name;
}

/** A value in running text: `Gas temperature 10 K`, `Grain radius 0.1 µm`. */
export function parameterValueText(name: string, value: number): string {
  const p = PARAMETER_NAMES[name];
  const unit = p ? (p.valueUnit ?? p.unit) : '';
  // Up to three significant figures, trailing zeros dropped: a held value is exact as given (`0.1 µm`, not `0.100`).
  const [mantissa, power] = numberText(value, 3).split('×');
  const text = (mantissa.includes('.') ? mantissa.replace(/\.?0+$/, '') : mantissa) + (power ? `×${power}` : '');
  return `${p?.name ?? name} ${text}${unit ? ` ${unit}` : ''}`;
}

export type ScaleKind = 'log' | 'linear';

/** Log axis when every value is positive and they span a decade or more. */
export function scaleKind(values: readonly number[]): ScaleKind {
  const finite = values.filter(Number.isFinite);
  if (finite.length === 0 || finite.some((v) => v <= 0)) return 'linear';
  return Math.max(...finite) / Math.min(...finite) >= LOG_AXIS_MIN_RATIO ? 'log' : 'linear';
}

export function toScale(kind: ScaleKind, v: number): number {
  return kind === 'log' ? Math.log10(v) : v;
}

export function fromScale(kind: ScaleKind, v: number): number {
  return kind === 'log' ? 10 ** v : v;
}

/** Cell edges around grid values in scale space: half-way between neighbours, half a step beyond the ends. */
export function cellEdges(kind: ScaleKind, values: readonly number[]): number[] {
  const s = values.map((v) => toScale(kind, v));
  if (s.length === 1) {
    const half = kind === 'log' ? 0.5 : Math.max(Math.abs(s[0]) * 0.1, 0.5);
    return [fromScale(kind, s[0] - half), fromScale(kind, s[0] + half)];
  }
  const edges = [s[0] - (s[1] - s[0]) / 2];
  for (let i = 0; i + 1 < s.length; i++) edges.push((s[i] + s[i + 1]) / 2);
  edges.push(s[s.length - 1] + (s[s.length - 1] - s[s.length - 2]) / 2);
  return edges.map((e) => fromScale(kind, e));
}

/**
 * Axis properties for a log axis over [lo, hi]: ticks at the decades inside,
 * labelled 10ⁿ (vega's default labels write 0.000001), or nothing special when
 * fewer than two decades fall inside (the default labels then read well).
 */
export function logAxis(lo: number, hi: number): DecadeAxis {
  const kLo = Math.ceil(Math.log10(lo) - 1e-9);
  const kHi = Math.floor(Math.log10(hi) + 1e-9);
  if (kHi - kLo < 1) return lo >= PLAIN_LABEL_MAX || hi < PLAIN_LABEL_MIN ? steppedLogAxis(lo, hi) : { format: '~g' };
  const step = Math.max(1, Math.ceil((kHi - kLo + 1) / MAX_DECADE_TICKS));
  const values: number[] = [];
  const labels: Record<string, string> = {};
  for (let k = kLo; k <= kHi; k += step) {
    // Parsing `1e-7` gives the double nearest 10^-7; 10 ** -7 can be one ulp off.
    const v = Number(`1e${k}`);
    values.push(v);
    labels[String(v)] = decadeText(k);
  }
  return { values, labelExpr: `${JSON.stringify(labels)}[datum.value]` };
}

/** Outside this range vega's default labels read 2e+18: such axes get 1, 2, 5 x 10ⁿ ticks labelled 2×10¹⁸. */
const PLAIN_LABEL_MIN = 0.01;
const PLAIN_LABEL_MAX = 1000;
const LOG_STEPS = [1, 2, 5];

function steppedLogAxis(lo: number, hi: number): DecadeAxis {
  const values: number[] = [];
  const labels: Record<string, string> = {};
  for (let k = Math.floor(Math.log10(lo)) - 1; k <= Math.ceil(Math.log10(hi)); k++) {
    for (const m of LOG_STEPS) {
      const v = Number(`${m}e${k}`);
      if (v < lo || v > hi) continue;
      values.push(v);
      labels[String(v)] = m === 1 ? decadeText(k) : `${m}×${decadeText(k)}`;
    }
  }
  return { values, labelExpr: `${JSON.stringify(labels)}[datum.value]` };
}

/** At most this many labelled decades on an axis about 200 px long. */
const MAX_DECADE_TICKS = 6;

/** A continuous position scale that keeps the given extent (`nice` would stretch a log domain to whole decades). */
export function positionScale(kind: ScaleKind, domain: [number, number] | number[]): { type: ScaleKind; domain: number[]; nice: false; zero?: false } {
  return kind === 'log' ? { type: kind, domain: [...domain], nice: false } : { type: kind, domain: [...domain], nice: false, zero: false };
}

/** Extent of values padded by a fraction of the range in scale space. */
export function paddedDomain(kind: ScaleKind, values: readonly number[], padFraction: number): [number, number] {
  const s = values.filter((v) => Number.isFinite(v) && (kind === 'linear' || v > 0)).map((v) => toScale(kind, v));
  let lo = Math.min(...s);
  let hi = Math.max(...s);
  if (!(hi > lo)) {
    const half = kind === 'log' ? 0.5 : Math.max(Math.abs(lo) * 0.1, 1);
    lo -= half;
    hi += half;
  }
  const pad = (hi - lo) * padFraction;
  return [fromScale(kind, lo - pad), fromScale(kind, hi + pad)];
}
