/**
 * The bridge between the fit stage's results (OUT/fit/fit.json) and a lock
 * file: each sightline's best density and age with their 68.3% intervals,
 * and the hashes of the tables the run wrote.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { UserError } from '../config/errors.ts';
import { TABLE_LEVEL } from '../fit/regions.ts';
import { AGE_PARAMETER, FIT_OUTPUT_FILES, type FitStageResult, type SightlineFit } from '../fit/types.ts';
import { hashFile } from './hash.ts';
import { DEFAULT_AGE_TOLERANCE_DEX, DEFAULT_DENSITY_TOLERANCE_DEX, defaultToleranceDex, TOLERANCE_GRID_STEPS, type LockedFit, type LockTolerance } from './lock.ts';
import type { StageState } from './state.ts';

const DENSITY = 'density';

/** Outputs that are tables (bytes must not change between clones), as opposed to figures and the HTML page. */
const TABLE_PATTERN = /\.(csv|tex|fits)$|^fit\/[^/]+\.json$|^report\/tables\//;

export function readFitResult(outDir: string): FitStageResult {
  const file = join(outDir, FIT_OUTPUT_FILES.fitJson);
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch {
    throw new UserError('the fit stage has not written its results. Run the pipeline (without --only) first.', { file });
  }
  return JSON.parse(text) as FitStageResult;
}

function intervalOf(fit: SightlineFit, parameter: string, best: number): { lo: number; hi: number } {
  const candidates = fit.intervals.filter((i) => i.parameter === parameter);
  if (candidates.length === 0) return { lo: best, hi: best };
  const closest = candidates.reduce((a, b) => (Math.abs(b.level - TABLE_LEVEL) < Math.abs(a.level - TABLE_LEVEL) ? b : a));
  return { lo: closest.lo, hi: closest.hi };
}

export function lockedFits(result: FitStageResult): LockedFit[] {
  return result.fits.map((fit) => {
    const density = fit.best.parameters[DENSITY];
    const ageYr = fit.best.ageYr;
    const d = intervalOf(fit, DENSITY, density);
    const a = intervalOf(fit, AGE_PARAMETER, ageYr);
    const parameters: Record<string, { best: number; lo: number; hi: number }> = {};
    for (const name of result.fittedParameters) {
      if (name in fit.heldParameters) continue;
      const best = name === AGE_PARAMETER ? ageYr : fit.best.parameters[name];
      parameters[name] = { best, ...intervalOf(fit, name, best) };
    }
    return { sightline: fit.sightline, density, densityLo: d.lo, densityHi: d.hi, ageYr, ageLoYr: a.lo, ageHiYr: a.hi, chi2: fit.best.chi2, parameters };
  });
}

/** sha256 of every table written by the fit and report stages, keyed by its path in the output folder. */
export function tableHashes(outDir: string, state: StageState): Record<string, string> {
  const tables: Record<string, string> = {};
  for (const stage of ['fit', 'report'] as const) {
    for (const rel of state[stage]?.outputs ?? []) {
      if (!TABLE_PATTERN.test(rel) || rel.endsWith('.vl.json')) continue;
      const h = hashFile(join(outDir, rel));
      if (h) tables[rel] = h;
    }
  }
  return tables;
}

/**
 * The lock's tolerances: given ones win; otherwise TOLERANCE_GRID_STEPS grid
 * steps of each fitted parameter (fit.json gridStepsDex), or the fixed
 * default of 0.1 dex where the fit states no step.
 */
export function lockTolerance(result: FitStageResult, given: { densityDex?: number; ageDex?: number }): LockTolerance {
  const steps = result.gridStepsDex ?? {};
  const parametersDex: Record<string, number> = {};
  for (const name of result.fittedParameters) if (name !== DENSITY && name !== AGE_PARAMETER) parametersDex[name] = defaultToleranceDex(steps[name], DEFAULT_DENSITY_TOLERANCE_DEX);
  return {
    densityDex: given.densityDex ?? defaultToleranceDex(steps[DENSITY], DEFAULT_DENSITY_TOLERANCE_DEX),
    ageDex: given.ageDex ?? defaultToleranceDex(steps[AGE_PARAMETER], DEFAULT_AGE_TOLERANCE_DEX),
    parametersDex,
    rule: `default: ${TOLERANCE_GRID_STEPS} grid steps of each parameter (one step passes, two fail); ${DEFAULT_DENSITY_TOLERANCE_DEX} dex where the grid step is not known; --density-tolerance and --age-tolerance override`,
  };
}
