/**
 * One model: a network under static physical conditions, integrated from an
 * initial composition to output times in years, with element and charge
 * conservation checked at every output. A solver failure is a status, never
 * an exception, so a grid can record it and go on.
 */
import { fillOutputs, modelNetwork, outputColumns } from '../chem/mantle.ts';
import { reactionLabel } from '../chem/reaction-text.ts';
import { compile, type CompiledSystem } from '../chem/system.ts';
import { drawRateFactors } from '../chem/uncertainty.ts';
import { evaporatedHydrogenShare, hydrogenGrainTerms, PHYSISORBED_H2_MAX_EVAPORATED_SHARE } from '../chem/grain-h2.ts';
import { UserError } from '../config/errors.ts';
import { integrate, type OdeProblem } from '../solve/index.ts';
import type { PhysicalConditions } from '../config/conditions.ts';
import { conditionsAt, type PhysicalTrack } from './physical-track.ts';
import { ConservationCheck } from './conservation.ts';
import { yearsToSeconds } from './times.ts';
import type { ModelInput, ModelResult } from './types.ts';
import { YEAR_SECONDS } from '../chem/constants.ts';

export { outputTimesYr } from './times.ts';
export { loadInitialComposition } from './initial.ts';
export { buildModelSetup, modelInput, type ModelSetup } from './setup.ts';

/**
 * The initial state vector; every named species must be in the network. With
 * grain options given, the state is that of the model's network (the mantle
 * twins appended when the mantle is on).
 */
export function initialState(input: Pick<ModelInput, 'network' | 'initial'> & { grain?: ModelInput['grain'] }): Float64Array {
  const network = input.grain ? modelNetwork(input.network, input.grain) : input.network;
  const { initial } = input;
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

/**
 * The physisorbed H(s) + H(s) route outside its range (physics.md section 10):
 * a note when, at some output, more than half of the H atoms striking grains
 * evaporate again instead of reacting.
 */
function physisorbedH2Notes(input: ModelInput, system: CompiledSystem, states: readonly Float64Array[]): string[] {
  const found = hydrogenGrainTerms(input.network, system.terms);
  if (found.evaporation.length === 0) return [];
  let worst = 0;
  let at = -1;
  for (let k = 0; k < states.length; k++) {
    const share = evaporatedHydrogenShare(found, system.terms, states[k]);
    if (share !== undefined && share > worst) {
      worst = share;
      at = k;
    }
  }
  if (!(worst > PHYSISORBED_H2_MAX_EVAPORATED_SHARE)) return [];
  return [
    `H2 forms by physisorbed H(s) + H(s) (grain.h2_formation: surface), which holds only while stuck H atoms meet a partner before they evaporate (up to about 15 K dust, physics.md section 10): at ${input.conditions.dust_temperature} K dust ${(100 * worst).toFixed(0)}% of the H atoms striking grains evaporate again (at ${input.timesYr[at].toPrecision(3)} yr), so H2 formation collapses and gas-phase H is overestimated. For warmer dust choose grain.h2_formation: hollenbach-mckee (Hollenbach & McKee 1979).`,
  ];
}

/**
 * The solver's problem for conditions that change with time: before each
 * right-hand side or Jacobian at a new time, the rate coefficients are
 * re-evaluated for the track's conditions at that time (the system is
 * non-autonomous; the solver calls both at the time of the state it asks for).
 */
function trackProblem(system: CompiledSystem, track: PhysicalTrack, start: PhysicalConditions): OdeProblem {
  const current = { ...start };
  let at = Number.NaN;
  const moveTo = (t: number): void => {
    if (t === at) return;
    conditionsAt(track, start, t, YEAR_SECONDS, current);
    system.retarget(current);
    at = t;
  };
  return {
    n: system.n,
    pattern: system.pattern,
    rankOne: system.rankOne,
    rhs(t, y, dydt) {
      moveTo(t);
      system.rhs(t, y, dydt);
    },
    jacobian(t, y, values) {
      moveTo(t);
      system.jacobian(t, y, values);
    },
    beginStep(t, y) {
      moveTo(t);
      return system.beginStep(t, y);
    },
  };
}

/** The conditions a track changes, at each output time. */
function trackConditions(track: PhysicalTrack, start: PhysicalConditions, timesYr: Float64Array): ModelResult['trackConditions'] {
  const names: (keyof PhysicalConditions)[] = track.kind === 'free-fall' ? ['density', 'visual_extinction'] : ['gas_temperature', 'dust_temperature'];
  const out: ModelResult['trackConditions'] = {};
  const c = { ...start };
  for (const name of names) out[name] = [];
  for (const t of timesYr) {
    conditionsAt(track, start, t * YEAR_SECONDS, YEAR_SECONDS, c);
    for (const name of names) out[name]!.push(c[name]);
  }
  return out;
}

export function runModel(input: ModelInput): ModelResult {
  const started = performance.now();
  checkTimes(input.timesYr);
  if (input.track?.kind === 'free-fall' && !(input.track.finalDensity > input.conditions.density)) {
    throw new UserError(`the collapse ends at final_density ${input.track.finalDensity} cm^-3, at or below its start density ${input.conditions.density} cm^-3. Raise final_density above the density condition.`, { field: 'physical_track.final_density' });
  }
  const network = modelNetwork(input.network, input.grain);
  const rateMultipliers = input.rateDraw ? drawRateFactors(input.network, input.rateDraw).multipliers : undefined;
  const system = compile(network, input.conditions, input.grain, { massActionOnly: input.massActionOnly, selfShielding: input.photochemistry?.h2SelfShielding, rateMultipliers });
  const y0 = initialState({ network, initial: input.initial });
  // With the mantle on, the outputs add the whole ice X(s) = X(surface) + X(mantle) (src/chem/mantle.ts).
  const columns = outputColumns(network.species, input.grain);
  const nOut = columns.names.length;
  const count = input.timesYr.length;
  const abundances = new Float64Array(count * nOut).fill(Number.NaN);
  const conservation = new ConservationCheck(network, y0);
  const stats = { steps: 0, failedSteps: 0, rhsEvals: 0, jacobianEvals: 0, factorizations: 0, newtonFailures: 0 };
  let status: 'ok' | 'failed' = 'ok';
  let failure: string | undefined;
  // The solver's states at the output times (the output columns may add the whole ice of the three-phase model).
  let states: Float64Array[] = [];
  try {
    const problem = input.track ? trackProblem(system, input.track, input.conditions) : system;
    const result = integrate(problem, y0, yearsToSeconds(input.timesYr), {
      rtol: input.solver.rtol,
      atol: input.solver.atol,
      maxSteps: input.solver.maxSteps,
    });
    states = result.y;
    result.y.forEach((y, k) => {
      fillOutputs(columns, y, abundances, k * nOut);
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
  const notes = [...system.clampNotes];
  if (input.grain.h2Formation === 'surface') notes.push(...physisorbedH2Notes(input, system, states));
  const last = states[states.length - 1];
  return {
    species: columns.names,
    timesYr: input.timesYr,
    abundances,
    finalState: last ? { species: network.species.map((s) => s.name), values: Float64Array.from(last) } : undefined,
    trackConditions: input.track ? trackConditions(input.track, input.conditions, input.timesYr) : undefined,
    status,
    failure,
    conservation: conservation.report(),
    stats,
    clampNotes: notes,
    skippedNotes: [
      ...system.skipped.map((s) => `${reactionLabel(s.reaction)}: ${s.reason}`),
      ...system.notes,
    ],
    wallMs: performance.now() - started,
  };
}
