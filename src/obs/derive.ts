/**
 * From column densities to what the fit compares with models: abundances
 * relative to H nuclei and ratios to a reference species (the quantity's
 * own, or the observations section's), in log10 with errors in dex, limits
 * carried through (docs/physics.md section 5).
 *
 * - N_H = (N_H/A_V) A_V, N_H/A_V = 1.87e21 cm^-2 mag^-1 by default (Bohlin,
 *   Savage & Drake 1978). Abundances use the observed line-of-sight A_V:
 *   X = N / N_H. For ice species an extinction threshold can be taken off
 *   first, A_V - A_th (ice forms only above A_th, about 3 mag for water ice:
 *   Whittet and co-workers, memory); gas species use the whole A_V.
 * - The model cloud's A_V is a fraction of the observed one (about half
 *   toward a background star: common practice); see `modelAv`. That is what
 *   a grid axis of visual extinction is tied to, not what N_H uses.
 * - Errors: first-order propagation of independent errors. For X = N / N_H,
 *   (sigma_X / X)^2 = (sigma_N / N)^2 + (sigma_AV / A_V)^2; for R = N1 / N2,
 *   (sigma_R / R)^2 = (sigma_1 / N1)^2 + (sigma_2 / N2)^2, taking the lower
 *   error of N1 with the upper error of N2 for the lower side of R and the
 *   other way round for the upper side (Bevington & Robinson, Data Reduction
 *   and Error Analysis, ch. 3). In dex, from the relative error s, the exact
 *   asymmetric form sigma_hi = log10(1 + s), sigma_lo = -log10(1 - s)
 *   (docs/physics.md section 12); detections below observations.min_snr are
 *   used as upper limits first (lowSignalAsLimits).
 *   The uncertainty of N_H/A_V itself is systematic and common to every
 *   sightline; it is not added, and it cancels in ratios.
 * - Limits: X of an upper (lower) limit is an upper (lower) limit. A ratio
 *   of a limit to a detection is a limit of the same kind; a detection over
 *   an upper limit is a lower limit and over a lower limit an upper limit;
 *   an upper limit over a lower limit is an upper limit (and the reverse a
 *   lower limit); two limits of the same kind bound nothing and are reported
 *   as unusable.
 */
import { throwProblems, UserError } from '../config/errors.ts';
import type { ObservationsSection } from '../config/sections/observations.ts';
import { isIceName } from './species-name.ts';
import type { Measurement, MeasurementKind, ObservationSet, ObservedQuantity, Sightline } from './types.ts';

export interface WantedQuantity {
  species: string;
  as: 'abundance' | 'ratio';
  /** Denominator of a ratio, any species the observations hold; default the section's reference. */
  reference?: string;
}

/** How many sightline names a warning lists before counting the rest. */
const MAX_NAMED = 8;

function placeOf(s: Sightline): string {
  if (s.pixel) return `pixel (${s.pixel.x}, ${s.pixel.y})`;
  if (s.source.line !== undefined) return `line ${s.source.line} ('${s.id}')`;
  if (s.source.row !== undefined) return `row ${s.source.row} ('${s.id}')`;
  return `sightline '${s.id}'`;
}

function names(ids: string[]): string {
  return ids.length > MAX_NAMED ? `${ids.slice(0, MAX_NAMED).join(', ')} and ${ids.length - MAX_NAMED} more` : ids.join(', ');
}

/** N_H = (N_H/A_V) * A_V, cm^-2 (Bohlin, Savage & Drake 1978 for the default ratio). */
export function hydrogenColumn(av: number, section: Pick<ObservationsSection, 'nh_per_av'>): number {
  return section.nh_per_av * av;
}

/** Extinction that N_H is taken from for a species: A_V, less the ice threshold for ice species. */
export function effectiveAv(av: number, species: string, section: Pick<ObservationsSection, 'ice_threshold_av'>): number {
  return isIceName(species) ? av - section.ice_threshold_av : av;
}

/** The model cloud's A_V for a sightline: model_av_fraction * observed A_V (0.5 toward background stars: common practice). */
export function modelAv(sightline: Sightline, section: Pick<ObservationsSection, 'model_av_fraction'>): number {
  if (sightline.av === undefined) {
    throw new UserError(`${placeOf(sightline)} has no A_V (nor A_K), so its model-cloud A_V cannot be set. Add an A_V column or give the extinction as a fixed condition.`, { file: sightline.source.file, line: sightline.source.line, row: sightline.source.row });
  }
  return section.model_av_fraction * sightline.av;
}

/** A relative error in dex: sigma_log10 = (sigma / X) / ln 10. */
function dex(relative: number): number {
  return relative / Math.LN10;
}

/** The relative error of a detection, lower and upper averaged (the symmetric part that correlations carry). */
function meanRelative(m: Measurement): number {
  return (m.errLo! + m.errHi!) / (2 * m.value);
}

/** Kind of N1/N2 from the kinds of N1 and N2; undefined when the ratio is not bounded. */
export function ratioKind(num: MeasurementKind, den: MeasurementKind): MeasurementKind | undefined {
  if (den === 'detection') return num;
  const flipped: MeasurementKind = den === 'upper' ? 'lower' : 'upper';
  if (num === 'detection') return flipped;
  return num === flipped ? num : undefined;
}

function limitConfidence(a: Measurement, b?: Measurement): number | undefined {
  const ca = a.kind !== 'detection' ? a.confidence : undefined;
  const cb = b && b.kind !== 'detection' ? b.confidence : undefined;
  // Both bounds hold together with probability ca * cb for independent measurements.
  if (ca !== undefined && cb !== undefined) return ca * cb;
  return ca ?? cb;
}

/** log10 errors below and above of a quantity with relative errors sLo, sHi (docs/physics.md section 12): exact, not first order. */
function logErrors(sLo: number, sHi: number): { lo: number; hi: number } {
  return { lo: -Math.log10(1 - sLo), hi: Math.log10(1 + sHi) };
}

/** The standard normal CDF at z by erf's series (Abramowitz & Stegun 7.1.26, |error| < 1.5e-7): the confidence of a limit at value + z sigma. */
function normalCdf(z: number): number {
  const x = Math.abs(z) / Math.SQRT2;
  const t = 1 / (1 + 0.3275911 * x);
  const erf = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-x * x);
  return z >= 0 ? 0.5 * (1 + erf) : 0.5 * (1 - erf);
}

/**
 * Low signal-to-noise detections as upper limits (docs/physics.md section 12,
 * common practice): a column whose value is below min_snr times its lower
 * error becomes an upper limit at value + min_snr x upper error, with
 * confidence Phi(min_snr) (0.977 for 2). In log10 such a detection has no
 * finite lower error; a symmetric first-order error (0.2 +- 0.8 as -0.7 +- 1.7
 * dex) would claim a precision it lacks.
 */
function lowSignalAsLimits(set: ObservationSet, minSnr: number, warnings: string[]): ObservationSet {
  if (!(minSnr > 0)) return set;
  const sightlines = set.sightlines.map((s) => {
    let columns = s.columns;
    for (const [species, m] of Object.entries(s.columns)) {
      if (m.kind !== 'detection' || m.errLo === undefined || m.errHi === undefined) continue;
      if (!(m.value < minSnr * m.errLo)) continue;
      const limit = Math.max(m.value, 0) + minSnr * m.errHi;
      if (columns === s.columns) columns = { ...s.columns };
      columns[species] = { kind: 'upper', value: limit, confidence: normalCdf(minSnr) };
      warnings.push(
        `${set.file}: ${placeOf(s)}: '${species}' = ${m.value.toPrecision(3)} +- ${m.errLo.toPrecision(3)} has S/N ${(m.value / m.errLo).toFixed(2)} < ${minSnr} (observations.min_snr): used as an upper limit at ${limit.toPrecision(3)}.`,
      );
    }
    return columns === s.columns ? s : { ...s, columns };
  });
  return { ...set, sightlines };
}

export function deriveQuantities(inputSet: ObservationSet, section: ObservationsSection, wanted: readonly WantedQuantity[]): { quantities: ObservedQuantity[]; warnings: string[] } {
  const quantities: ObservedQuantity[] = [];
  const warnings: string[] = [];
  const set = lowSignalAsLimits(inputSet, section.min_snr ?? 0, warnings);
  const problems: UserError[] = [];
  const outside = new Set(set.outsideNetwork ?? []);
  const done = new Set<string>();
  for (const w of wanted) {
    const ref = w.reference ?? section.reference;
    const key = w.as === 'ratio' ? `ratio:${w.species}/${ref}` : `abundance:${w.species}`;
    if (done.has(key)) continue;
    done.add(key);
    const inFile = set.species ?? [...new Set(set.sightlines.flatMap((s) => Object.keys(s.columns)))];
    const what = w.as === 'ratio' ? `ratio ${w.species}/${ref}` : `abundance X(${w.species})`;
    if (!inFile.includes(w.species)) {
      problems.push(new UserError(`the ${w.as === 'ratio' ? 'ratio' : 'abundance'} of '${w.species}' is asked for, but the observations have no column for it (they have ${inFile.join(', ') || 'none'}). Check the spelling or the column mapping.`, { file: set.file, field: w.species }));
      continue;
    }
    if (w.as === 'ratio' && w.species !== ref && !inFile.includes(ref)) {
      if (w.reference !== undefined) {
        problems.push(new UserError(`the ${what} is asked for, but the observations have no column for its reference '${ref}' (they have ${inFile.join(', ')}). Give the quantity a reference they have.`, { file: set.file, field: 'fit.quantities' }));
      } else if (!problems.some((p) => p.location.field === 'reference')) {
        // One problem for the section's reference, however many ratios ask for it.
        problems.push(new UserError(`ratios to the reference '${ref}' are asked for, but the observations have no column for it (they have ${inFile.join(', ')}). Set 'reference' in the observations section to a species they have.`, { file: set.file, field: 'reference' }));
      }
      continue;
    }
    // A column the network lacks is carried for the reader, but no model gives it, so it cannot be fitted.
    const lacking = [w.species, ...(w.as === 'ratio' ? [ref] : [])].filter((sp) => outside.has(sp));
    if (lacking.length > 0) {
      problems.push(new UserError(`the ${what} is asked for, but the network has no species ${lacking.map((sp) => `'${sp}'`).join(' or ')}, so no model gives it. Remove the quantity from fit.quantities, or add the species to the network.`, { field: 'fit.quantities' }));
      continue;
    }
    if (!set.sightlines.some((s) => s.columns[w.species])) {
      warnings.push(`${set.file}: '${w.species}' is not observed toward any sightline; no ${w.as === 'ratio' ? 'ratio' : 'abundance'} derived.`);
      continue;
    }
    if (w.as === 'abundance') {
      const noIce: string[] = [];
      const label = `X(${w.species})`;
      for (const s of set.sightlines) {
        const m = s.columns[w.species];
        if (!m) continue;
        if (s.av === undefined) {
          problems.push(new UserError(`${s.pixel ? `${placeOf(s)}: ` : ''}the abundance of '${w.species}' is asked for, but this sightline has no A_V (nor A_K). Give its extinction, or fit ratios to ${ref} instead (they need no A_V).`, { file: s.source.file, line: s.source.line, row: s.source.row, field: 'A_V' }));
          continue;
        }
        const avEff = effectiveAv(s.av, w.species, section);
        if (!(avEff > 0)) {
          noIce.push(s.id);
          continue;
        }
        const x = m.value / hydrogenColumn(avEff, section);
        const q: ObservedQuantity = { sightline: s.id, label, numerator: w.species, kind: m.kind, log10: Math.log10(x), sigmaLoDex: 0, sigmaHiDex: 0 };
        if (m.kind === 'detection') {
          const relAv = s.avErr !== undefined ? s.avErr / avEff : 0;
          const e = logErrors(Math.hypot(m.errLo! / m.value, relAv), Math.hypot(m.errHi! / m.value, relAv));
          if (!Number.isFinite(e.lo)) {
            warnings.push(`${set.file}: ${placeOf(s)}: X(${w.species}) has a relative error of 1 or more (A_V included): no lower error in log10; used as an upper limit.`);
            quantities.push({ sightline: s.id, label, numerator: w.species, kind: 'upper', log10: Math.log10(x) + e.hi, sigmaLoDex: 0, sigmaHiDex: 0 });
            continue;
          }
          q.sigmaLoDex = e.lo;
          q.sigmaHiDex = e.hi;
          q.errorParts = [{ source: w.species, dex: dex(meanRelative(m)), sign: 1 }];
          if (relAv > 0) q.errorParts.push({ source: 'A_V', dex: dex(relAv), sign: -1 });
        } else if (m.confidence !== undefined) q.confidence = m.confidence;
        quantities.push(q);
      }
      if (noIce.length > 0) {
        warnings.push(`${set.file}: A_V is at or below the ice threshold (${section.ice_threshold_av} mag) toward ${names(noIce)}; no abundance of '${w.species}' derived there (no ice is expected below the threshold).`);
      }
      continue;
    }
    if (w.species === ref) {
      warnings.push(`${set.file}: '${w.species}' is the reference species; its ratio to itself is 1 and is not derived.`);
      continue;
    }
    const noRef: string[] = [];
    const label = `${w.species}/${ref}`;
    const unbounded: string[] = [];
    for (const s of set.sightlines) {
      const n = s.columns[w.species];
      if (!n) continue;
      const d = s.columns[ref];
      if (!d) {
        noRef.push(s.id);
        continue;
      }
      const kind = ratioKind(n.kind, d.kind);
      if (!kind) {
        unbounded.push(`${s.id} (${n.kind} / ${d.kind} limit)`);
        continue;
      }
      const q: ObservedQuantity = { sightline: s.id, label, numerator: w.species, denominator: ref, kind, log10: Math.log10(n.value / d.value), sigmaLoDex: 0, sigmaHiDex: 0 };
      if (kind === 'detection') {
        const e = logErrors(Math.hypot(n.errLo! / n.value, d.errHi! / d.value), Math.hypot(n.errHi! / n.value, d.errLo! / d.value));
        if (!Number.isFinite(e.lo)) {
          warnings.push(`${set.file}: ${placeOf(s)}: ${label} has a relative error of 1 or more: no lower error in log10; used as an upper limit.`);
          quantities.push({ ...q, kind: 'upper', log10: q.log10 + e.hi });
          continue;
        }
        q.sigmaLoDex = e.lo;
        q.sigmaHiDex = e.hi;
        q.errorParts = [
          { source: w.species, dex: dex(meanRelative(n)), sign: 1 },
          { source: ref, dex: dex(meanRelative(d)), sign: -1 },
        ];
      } else {
        const c = limitConfidence(n, d);
        if (c !== undefined) q.confidence = c;
      }
      quantities.push(q);
    }
    if (noRef.length > 0) warnings.push(`${set.file}: the reference '${ref}' is not observed toward ${names(noRef)}; no ratio ${w.species}/${ref} there.`);
    if (unbounded.length > 0) warnings.push(`${set.file}: ${w.species}/${ref} is unusable toward ${names(unbounded)}: two limits of the same kind bound nothing.`);
  }
  throwProblems(problems, `${problems.length} problems:`, { file: set.file });
  return { quantities, warnings };
}
