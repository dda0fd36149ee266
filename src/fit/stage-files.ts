/**
 * The text of the fit stage's files (FIT_OUTPUT_FILES): best_fits.csv,
 * intervals.csv, residuals.csv, joint_fits.csv, fit.json, profiles.json and,
 * for a map, map.json. Formatting only; the caller writes them.
 */
import { toCsv, type CsvCell } from '../config/csv.ts';
import type { ObservationSet } from '../obs/types.ts';
import { candidateValue } from './candidate-ref.ts';
import { TABLE_LEVEL } from './regions.ts';
import {
  AGE_PARAMETER,
  FIT_OUTPUT_FILES,
  MAP_IMAGE_NAMES,
  type CandidateTable,
  type FitStageResult,
  type MapFitImages,
  type MapFitJson,
  type MapImageName,
  type ParameterInterval,
  type ProfilesJson,
  type SightlineFit,
} from './types.ts';

const DENSITY = 'density';
function tableInterval(fit: SightlineFit, parameter: string): ParameterInterval | undefined {
  return fit.intervals.find((iv) => iv.parameter === parameter && iv.level === TABLE_LEVEL);
}

/** Grid parameters after density, in the table's order. */
function otherParameters(table: CandidateTable): string[] {
  return table.parameterNames.filter((p) => p !== DENSITY);
}

function bestFitsCsv(result: FitStageResult, table: CandidateTable): string {
  const others = otherParameters(table);
  const varied = new Set(result.fittedParameters);
  const header = [
    'sightline', 'density', 'age_yr', 'chi2', 'dof', 'reduced_chi2', 'p_value', 'agreement',
    'density_lo', 'density_hi', 'age_lo_yr', 'age_hi_yr',
    ...others.flatMap((p) => (varied.has(p) ? [p, `${p}_lo`, `${p}_hi`] : [p])),
    'density_at_edge', 'age_at_edge', 'poor_fit', 'detections', 'upper_limits', 'lower_limits', 'model_id',
    'density_unresolved', 'age_unresolved', 'density_disjoint', 'age_disjoint', 'delta_chi2', 'parameters_of_interest',
  ];
  const tableLevel = result.levels.find((l) => l.level === TABLE_LEVEL);
  const rows = result.fits.map((f) => {
    const bounds = (p: string): [CsvCell, CsvCell] => {
      const iv = tableInterval(f, p);
      const best = candidateValue(f.best, p);
      return iv ? [iv.lo, iv.hi] : [best, best];
    };
    const edge = (p: string): boolean => {
      const iv = tableInterval(f, p);
      return iv !== undefined && (iv.loAtEdge || iv.hiAtEdge);
    };
    return [
      f.sightline, f.best.parameters[DENSITY], f.best.ageYr, f.best.chi2, f.dof, f.reducedChi2, f.pValue, f.agreementFraction,
      ...bounds(DENSITY), ...bounds(AGE_PARAMETER),
      ...others.flatMap((p) => (varied.has(p) ? [f.best.parameters[p], ...bounds(p)] : [f.best.parameters[p]])),
      edge(DENSITY), edge(AGE_PARAMETER), f.pValue < result.poorFitP, f.counts.detections, f.counts.upperLimits, f.counts.lowerLimits, f.best.modelId,
      tableInterval(f, DENSITY)?.unresolved ?? false, tableInterval(f, AGE_PARAMETER)?.unresolved ?? false,
      tableInterval(f, DENSITY)?.disjoint ?? false, tableInterval(f, AGE_PARAMETER)?.disjoint ?? false,
      tableLevel?.deltaChi2 ?? null, tableLevel?.parametersOfInterest ?? null,
    ];
  });
  return toCsv(header, rows);
}

function mapBestFitsCsv(map: MapFitImages, table: CandidateTable, observations: ObservationSet): string {
  const others = otherParameters(table);
  const np = table.parameterNames.length;
  const header = ['sightline', 'x', 'y', 'density', 'age_yr', 'chi2', 'dof', 'reduced_chi2', 'p_value', 'density_lo', 'density_hi', 'age_lo_yr', 'age_hi_yr', ...others, 'at_edge', 'model_id', 'unresolved', 'density_subgrid', 'age_subgrid_yr'];
  const rows: CsvCell[][] = [];
  const im = map.images;
  for (const s of observations.sightlines) {
    if (!s.pixel) continue;
    const i = s.pixel.y * map.nx + s.pixel.x;
    const c = map.bestCandidate[i];
    if (c < 0) continue;
    const model = Math.floor(c / table.nTimes);
    rows.push([
      s.id, s.pixel.x, s.pixel.y, im.best_density[i], im.best_age_yr[i], im.best_chi2[i], im.dof[i], im.reduced_chi2[i], im.p_value[i],
      im.density_lo[i], im.density_hi[i], im.age_lo_yr[i], im.age_hi_yr[i],
      ...others.map((p) => table.parameters[model * np + table.parameterNames.indexOf(p)]),
      im.at_edge[i] === 1, table.modelIds[model], im.unresolved[i] === 1, im.density_subgrid[i], im.age_subgrid_yr[i],
    ]);
  }
  return toCsv(header, rows);
}

function intervalsCsv(result: FitStageResult): string {
  const header = ['fit', 'kind', 'parameter', 'level', 'delta_chi2', 'best', 'lo', 'hi', 'lo_at_edge', 'hi_at_edge', 'disjoint', 'unresolved', 'parameters_of_interest', 'best_node', 'node_lo', 'node_hi'];
  const row = (name: string, kind: string, iv: ParameterInterval): CsvCell[] => [
    name, kind, iv.parameter, iv.level, iv.deltaChi2Threshold, iv.best, iv.lo, iv.hi, iv.loAtEdge, iv.hiAtEdge, iv.disjoint, iv.unresolved,
    iv.parametersOfInterest ?? null, iv.bestNode ?? null, iv.nodeLo ?? null, iv.nodeHi ?? null,
  ];
  const rows = [...result.fits.flatMap((f) => f.intervals.map((iv) => row(f.sightline, 'sightline', iv))), ...result.joint.flatMap((j) => j.intervals.map((iv) => row(j.name, 'joint', iv)))];
  return toCsv(header, rows);
}

function residualsCsv(result: FitStageResult): string {
  const header = ['sightline', 'quantity', 'kind', 'observed_log10', 'sigma_lo_dex', 'sigma_hi_dex', 'model_log10', 'residual_dex', 'sigma_dex', 'chi2', 'agrees'];
  const rows = result.fits.flatMap((f) => f.residuals.map((r) => [f.sightline, r.label, r.kind, r.observedLog10, r.sigmaLoDex, r.sigmaHiDex, r.modelLog10, r.residualDex, r.sigmaDex, r.chi2, r.agrees]));
  return toCsv(header, rows);
}

function jointFitsCsv(result: FitStageResult, table: CandidateTable): string {
  const params = [...table.parameterNames, AGE_PARAMETER];
  const header = ['group', 'shared', 'group_chi2', 'group_dof', 'group_p_value', 'member', 'member_chi2', ...params, 'model_id'];
  const rows = result.joint.flatMap((j) =>
    j.memberFits.map((m) => [j.name, j.shared.map((s) => `${s}=${j.sharedBest[s]}`).join(' '), j.chi2, j.dof, j.pValue, m.sightline, m.chi2, ...params.map((p) => candidateValue(m.best, p)), m.best.modelId]),
  );
  return toCsv(header, rows);
}

export function mapJson(map: MapFitImages): MapFitJson {
  const images = {} as Record<MapImageName, (number | null)[]>;
  for (const name of MAP_IMAGE_NAMES) images[name] = Array.from(map.images[name], (v) => (Number.isFinite(v) ? v : null));
  return { format: 'hoarfrost-fit-map/1', nx: map.nx, ny: map.ny, fittedPixels: map.fittedPixels, level: map.level, images, warnings: map.warnings };
}

export function stageFiles(result: FitStageResult, profiles: ProfilesJson, map: MapFitImages | undefined, table: CandidateTable, observations: ObservationSet): Record<string, string> {
  const files: Record<string, string> = {
    [FIT_OUTPUT_FILES.bestFitsCsv]: map ? mapBestFitsCsv(map, table, observations) : bestFitsCsv(result, table),
    [FIT_OUTPUT_FILES.intervalsCsv]: intervalsCsv(result),
    [FIT_OUTPUT_FILES.residualsCsv]: residualsCsv(result),
    [FIT_OUTPUT_FILES.jointFitsCsv]: jointFitsCsv(result, table),
    [FIT_OUTPUT_FILES.fitJson]: JSON.stringify(result, null, 1) + '\n',
    [FIT_OUTPUT_FILES.profilesJson]: JSON.stringify(profiles) + '\n',
  };
  if (map) files[FIT_OUTPUT_FILES.mapJson] = JSON.stringify(mapJson(map)) + '\n';
  return files;
}
