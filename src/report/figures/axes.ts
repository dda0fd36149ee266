/**
 * Axis titles with units, log-or-linear choice and decade labels shared by
 * the figure builders.
 */
import { decadeText } from '../numbers.ts';

/** Axis properties a log axis gets (merged into a Vega-Lite axis). */
export interface DecadeAxis {
  values?: number[];
  labelExpr?: string;
  format?: string;
}

/** A quantity spanning at least this ratio (max/min) gets a log axis: one decade. */
const LOG_AXIS_MIN_RATIO = 10;

/** Axis titles of the condition names (units as design.md fixes them). */
const PARAMETER_TITLES: Record<string, string> = {
  density: 'Density (cm⁻³)',
  age_yr: 'Chemical age (yr)',
  gas_temperature: 'Gas temperature (K)',
  dust_temperature: 'Dust temperature (K)',
  visual_extinction: 'Model extinction (mag)',
  cr_ionisation_rate: 'Cosmic-ray ionisation rate (s⁻¹)',
  uv_field: 'UV field (G0, Habing)',
  diffusion_ratio: 'Diffusion-to-binding energy ratio',
  grain_radius: 'Grain radius (µm)',
  dust_to_gas: 'Dust-to-gas mass ratio',
  reactive_desorption: 'Reactive desorption fraction',
  // Physical-track parameters on grid axes (src/config/sections/track.ts, TRACK_PARAMETERS).
  final_density: 'Final density of the collapse (cm⁻³)',
  retardation: 'Collapse retardation factor B',
  final_temperature: 'Final warm-up temperature (K)',
  duration_yr: 'Warm-up duration (yr)',
};

export const AV_TITLE = 'Visual extinction (mag)';
export const DELTA_CHI2_TITLE = 'Δχ²';
export const CHI2_TITLE = 'χ²';

export function parameterTitle(name: string): string {
  return PARAMETER_TITLES[name] ?? name;
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
  if (kHi - kLo < 1) return { format: '~g' };
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
