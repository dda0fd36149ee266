/**
 * Model tracks for the report: the fitted quantities (abundances or ratios)
 * of each sightline's best-fit model, and of its runner-ups, against time,
 * read from the model store (and interpolated as the fit did for a model of
 * its refined mesh).
 */
import { loadCandidates } from '../grid/candidates.ts';
import { buildAxes } from '../fit/axes.ts';
import { refineTable } from '../fit/refine.ts';
import type { CandidateTable, FitStageResult, QuantityScore } from '../fit/types.ts';
import type { ModelTrack } from '../report/types.ts';

interface TrackRequest {
  sightline: string;
  modelId: string;
  role: ModelTrack['role'];
  residuals: readonly QuantityScore[];
}

/** `candidates` reads the table the fit read (the store's models, or layered columns); by default the store's models. */
export function loadTracks(storeFile: string, fit: FitStageResult, runnerUps: number, candidates: (species: string[]) => CandidateTable = (species) => loadCandidates(storeFile, species)): ModelTrack[] {
  const requests: TrackRequest[] = [];
  for (const f of fit.fits) {
    requests.push({ sightline: f.sightline, modelId: f.best.modelId, role: 'best', residuals: f.residuals });
    // Runner-ups can share the best fit's model at another time; a track is per model.
    const seen = new Set([f.best.modelId]);
    for (const r of f.runnerUps) {
      if (seen.size > runnerUps) break;
      if (seen.has(r.modelId)) continue;
      seen.add(r.modelId);
      requests.push({ sightline: f.sightline, modelId: r.modelId, role: 'runner-up', residuals: f.residuals });
    }
  }
  if (requests.length === 0) return [];
  const species = new Set<string>();
  for (const q of requests.flatMap((r) => r.residuals)) {
    species.add(q.numerator);
    if (q.denominator) species.add(q.denominator);
  }
  const stored = candidates([...species].sort());
  // A best fit between grid values (id `~...`) is a model of the fit's refined mesh: the same refinement of the table gives its track.
  const refined = fit.interpolation !== undefined && requests.some((r) => r.modelId.startsWith('~'));
  const table = refined ? refineTable(stored, buildAxes(stored), fit.interpolation!.axes, fit.interpolation!.factor).table : stored;
  const rowOf = new Map(table.modelIds.map((id, i) => [id, i]));
  const column = new Map(table.species.map((s, i) => [s, i]));
  const timesYr = Array.from(table.timesYr);
  const tracks: ModelTrack[] = [];
  for (const r of requests) {
    const m = rowOf.get(r.modelId);
    if (m === undefined) continue;
    for (const q of r.residuals) {
      const num = column.get(q.numerator)!;
      const den = q.denominator === undefined ? undefined : column.get(q.denominator)!;
      const log10 = timesYr.map((_, t) => {
        const base = (m * table.nTimes + t) * table.nSpecies;
        const x = table.abundances[base + num];
        const value = den === undefined ? x : x / table.abundances[base + den];
        return value > 0 && Number.isFinite(value) ? Math.log10(value) : null;
      });
      tracks.push({ sightline: r.sightline, label: q.label, modelId: r.modelId, role: r.role, timesYr, log10 });
    }
  }
  return tracks;
}
