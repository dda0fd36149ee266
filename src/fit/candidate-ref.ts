/** A candidate index (model * nTimes + time) turned into the record every output shows. */
import type { CandidateRef, CandidateTable } from './types.ts';

export function candidateRef(table: CandidateTable, candidate: number, chi2: number, chi2Best: number): CandidateRef {
  const model = Math.floor(candidate / table.nTimes);
  const time = candidate - model * table.nTimes;
  const np = table.parameterNames.length;
  const parameters: Record<string, number> = {};
  for (let p = 0; p < np; p++) parameters[table.parameterNames[p]] = table.parameters[model * np + p];
  return { modelId: table.modelIds[model], modelIndex: model, timeIndex: time, ageYr: table.timesYr[time], parameters, chi2, deltaChi2: chi2 - chi2Best };
}

/** Value of a parameter (or age_yr) of a candidate. */
export function candidateValue(ref: CandidateRef, parameter: string): number {
  return parameter === 'age_yr' ? ref.ageYr : ref.parameters[parameter];
}
