/** Output times of a model run. */
import { UserError } from '../config/errors.ts';
import { YEAR_SECONDS } from '../chem/constants.ts';

/** `count` times from startYr to endYr (both included), spaced evenly in log10 t (common practice for chemical ages). */
export function outputTimesYr(startYr: number, endYr: number, count: number): Float64Array {
  if (!(startYr > 0) || !(endYr > startYr) || !Number.isInteger(count) || count < 2) {
    throw new UserError(`output times need 0 < start_yr < end_yr and an integer count of at least 2; found start_yr ${startYr}, end_yr ${endYr}, count ${count}.`, { field: 'times' });
  }
  const out = new Float64Array(count);
  const a = Math.log10(startYr);
  const step = (Math.log10(endYr) - a) / (count - 1);
  for (let i = 0; i < count; i++) out[i] = 10 ** (a + i * step);
  out[0] = startYr;
  out[count - 1] = endYr;
  return out;
}

/** Years (Julian) to seconds. */
export function yearsToSeconds(timesYr: Float64Array): Float64Array {
  return timesYr.map((t) => t * YEAR_SECONDS);
}
