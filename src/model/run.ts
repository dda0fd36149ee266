/**
 * One model: a network under static physical conditions, integrated from an
 * initial composition to output times in years, with element and charge
 * conservation checked at every output. A solver failure is a status, never
 * an exception, so a grid can record it and go on.
 */
import { compile } from '../chem/system.ts';
import { UserError } from '../config/errors.ts';
import { integrate } from '../solve/index.ts';
import { ConservationCheck } from './conservation.ts';
import { yearsToSeconds } from './times.ts';
import type { ModelInput, ModelResult } from './types.ts';
import { YEAR_SECONDS } from '../chem/constants.ts';

export { outputTimesYr } from './times.ts';
export { loadInitialComposition } from './initial.ts';
export { buildModelSetup, modelInput, type ModelSetup } from './setup.ts';

/** The initial state vector; every named species must be in the network. */
export function initialState(input: Pick<ModelInput, 'network' | 'initial'>): Float64Array {
  const { network, initial } = input;
  const y0 = new Float64Array(network.species.length);
  for (const [name, value] of Object.entries(initial)) {
    const i = network.speciesIndex.get(name);
    if (i === undefined) {
      throw new UserError(`the initial composition needs species '${name}', which network '${network.name}' (${network.file}) does not have. Add it to the network or remove it from the initial composition.`);
    }
    y0[i] = value;
  }
  return y0;
}

function checkTimes(timesYr: Float64Array): void {
  for (let i = 0; i < timesYr.length; i++) {
    if (!(timesYr[i] > 0) || (i > 0 && !(timesYr[i] > timesYr[i - 1]))) {
      throw new UserError(`output times must be positive and increasing; time ${i + 1} is ${timesYr[i]} yr.`, { field: 'times' });
    }
  }
}

export function runModel(input: ModelInput): ModelResult {
  const started = performance.now();
  checkTimes(input.timesYr);
  const system = compile(input.network, input.conditions, input.grain, { massActionOnly: input.massActionOnly, selfShielding: input.photochemistry?.h2SelfShielding });
  const y0 = initialState(input);
  const n = system.n;
  const count = input.timesYr.length;
  const abundances = new Float64Array(count * n).fill(Number.NaN);
  const conservation = new ConservationCheck(input.network, y0);
  const stats = { steps: 0, failedSteps: 0, rhsEvals: 0, jacobianEvals: 0, factorizations: 0, newtonFailures: 0 };
  let status: 'ok' | 'failed' = 'ok';
  let failure: string | undefined;
  try {
    const result = integrate(system, y0, yearsToSeconds(input.timesYr), {
      rtol: input.solver.rtol,
      atol: input.solver.atol,
      maxSteps: input.solver.maxSteps,
    });
    result.y.forEach((y, k) => {
      abundances.set(y, k * n);
      conservation.observe(y);
    });
    const s = result.stats;
    Object.assign(stats, {
      steps: s.steps,
      failedSteps: s.failedSteps,
      rhsEvals: s.rhsEvals,
      jacobianEvals: s.jacobianEvals,
      factorizations: s.factorizations,
      newtonFailures: s.newtonFailures,
    });
    if (result.status !== 'ok') {
      status = 'failed';
      const at = result.failureTime !== undefined ? ` at t = ${(result.failureTime / YEAR_SECONDS).toPrecision(4)} yr` : '';
      failure = `the solver stopped${at} after ${result.y.length} of ${count} output times: ${result.status}`;
    }
  } catch (e) {
    if (e instanceof UserError) throw e;
    status = 'failed';
    failure = `the solver failed: ${(e as Error).message}`;
  }
  return {
    species: system.species,
    timesYr: input.timesYr,
    abundances,
    status,
    failure,
    conservation: conservation.report(),
    stats,
    clampNotes: system.clampNotes,
    skippedNotes: system.skipped.map((s) => `reaction ${s.reaction.index + 1} (${s.reaction.reactants.join(' + ')} -> ${s.reaction.products.join(' + ')}): ${s.reason}`),
    wallMs: performance.now() - started,
  };
}
