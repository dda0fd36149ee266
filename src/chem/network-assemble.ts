/**
 * Turns the entries read from a network file (YAML or a mapped table) into a
 * Network: checks every reaction against its rate law (parameters, reactant
 * count, phases), parses every species, fills parameter defaults, and
 * collects every problem of the file before throwing them together.
 *
 * What it does not judge (conservation, duplicates, orphans, temperature
 * ranges that are inverted) is left to network-check.ts, so that
 * `hoarfrost network check` can list those problems instead of stopping at
 * the first.
 */
import { UserError, UserErrors, type ErrorLocation } from '../config/errors.ts';
import { isRateLawName, RATE_LAW_NAMES, RATE_LAWS, type RateLaw, type RateLawName } from './laws.ts';
import type { Network, Reaction, SourceLocation, SpeciesData } from './network-types.ts';
import { iceName, tryParseSpecies, type Species } from './species.ts';

/**
 * Temperature range, K, of a gas-phase reaction that gives none: wide enough
 * that no dark-cloud or warm-envelope model is clamped by it (our choice).
 */
export const DEFAULT_TMIN = 1;
export const DEFAULT_TMAX = 100000;

/** Laws whose rate depends on the gas temperature and so may carry a temperature range. */
export const GAS_TEMPERATURE_LAWS: ReadonlySet<RateLawName> = new Set<RateLawName>(['arrhenius', 'cosmic-ray', 'cosmic-ray-uv', 'interstellar-uv']);

/** Laws whose single product must be the other-phase form of the reactant. */
const PHASE_CHANGE_LAWS: ReadonlySet<RateLawName> = new Set<RateLawName>(['accretion', 'thermal-desorption', 'cr-desorption']);

/** Where a field of an entry sits, for error messages. */
export type Locate = (field?: string) => ErrorLocation;

export interface RawSpecies {
  name: string;
  bindingEnergy?: number;
  mass?: number;
  noSurfaceSink?: string;
  origin?: string;
  source: SourceLocation;
  locate: Locate;
}

export interface RawReaction {
  reactants: string[];
  products: string[];
  law: string;
  /** Parameters as given (not yet checked against the law). */
  params: Record<string, number>;
  temperature?: readonly [number, number];
  origin?: string;
  /** Uncertainty factor F as given (checked here: finite, at least 1). */
  uncertaintyFactor?: number;
  source: SourceLocation;
  locate: Locate;
}

export interface RawNetwork {
  name: string;
  file: string;
  description?: string;
  /** Default origin of entries that give none. */
  origin?: string;
  species: RawSpecies[];
  reactions: RawReaction[];
  contentHash: string;
  /** Problems the reader already found (schema errors, bad rows); reported with the rest. */
  problems: UserError[];
}

const UNPARSEABLE_HINT = 'Photons, cosmic rays and grains are not written as species: the rate law names the process.';

export function assembleNetwork(raw: RawNetwork): Network {
  const problems = [...raw.problems];
  const species: Species[] = [];
  const speciesIndex = new Map<string, number>();
  const speciesData = new Map<string, SpeciesData>();
  /** Where each ice species is first used, to locate a missing binding energy. */
  const firstIceUse = new Map<string, ErrorLocation>();

  const addSpecies = (s: Species): void => {
    if (!speciesIndex.has(s.name)) {
      speciesIndex.set(s.name, species.length);
      species.push(s);
    }
  };

  const dataOwner = new Map<string, ErrorLocation>();
  /** Species whose entry was rejected: their reactions are not blamed again for the missing data. */
  const rejectedData = new Set<string>();
  for (const entry of raw.species) {
    const parsed = tryParseSpecies(entry.name);
    if (typeof parsed === 'string') {
      problems.push(new UserError(parsed, entry.locate('name')));
      continue;
    }
    if (parsed.isElectron) {
      problems.push(new UserError("'e-' needs no species entry: electrons have no binding energy and their mass is known. Remove the entry.", entry.locate('name')));
      continue;
    }
    const previous = dataOwner.get(parsed.gasName);
    if (previous) {
      problems.push(new UserError(`species data for '${parsed.gasName}' given twice (first ${describeLocation(previous)}); one entry serves both ${parsed.gasName} and ${iceName(parsed.gasName)}. Remove one.`, entry.locate('name')));
      continue;
    }
    dataOwner.set(parsed.gasName, entry.locate('name'));
    let ok = true;
    if (entry.bindingEnergy !== undefined && !(Number.isFinite(entry.bindingEnergy) && entry.bindingEnergy >= 0)) {
      problems.push(new UserError(`binding energy must be a non-negative energy E_D/k_B in K (physisorbed species are of order 400-6000 K); found ${entry.bindingEnergy}.`, entry.locate('binding_energy')));
      ok = false;
    }
    if (entry.mass !== undefined && !(Number.isFinite(entry.mass) && entry.mass > 0)) {
      problems.push(new UserError(`mass must be a positive number of u; found ${entry.mass}.`, entry.locate('mass')));
      ok = false;
    }
    if (entry.noSurfaceSink !== undefined && entry.noSurfaceSink.trim() === '') {
      problems.push(new UserError(`no_surface_sink must say why no surface reaction destroys ${iceName(parsed.gasName)} (a sentence a reader of the network can check); found an empty text. Give the reason or remove the key.`, entry.locate('no_surface_sink')));
      ok = false;
    }
    if (!ok) {
      rejectedData.add(parsed.gasName);
      continue;
    }
    addSpecies(entry.mass !== undefined ? { ...parsed, mass: entry.mass } : parsed);
    speciesData.set(parsed.gasName, {
      name: parsed.gasName,
      bindingEnergy: entry.bindingEnergy,
      mass: entry.mass,
      noSurfaceSink: entry.noSurfaceSink,
      origin: entry.origin ?? raw.origin,
      source: entry.source,
    });
  }

  const reactions: Reaction[] = [];
  for (const entry of raw.reactions) {
    const reaction = assembleReaction(entry, raw, reactions.length, problems);
    if (!reaction) continue;
    for (const name of [...reaction.reactants, ...reaction.products]) {
      const s = tryParseSpecies(name);
      if (typeof s === 'string') continue;
      const data = speciesData.get(s.gasName);
      addSpecies(data?.mass !== undefined && !s.isElectron ? { ...s, mass: data.mass } : s);
      if (s.phase === 'ice' && !firstIceUse.has(s.gasName)) firstIceUse.set(s.gasName, entry.locate());
    }
    reactions.push(reaction);
  }

  for (const [gasName, where] of firstIceUse) {
    if (speciesData.get(gasName)?.bindingEnergy === undefined && !rejectedData.has(gasName)) {
      problems.push(new UserError(`the ice species ${iceName(gasName)} has no binding energy; its desorption and diffusion rates need one. Add {name: ${gasName}, binding_energy: <K>} to the species list.`, where));
    }
  }

  if (raw.reactions.length === 0 && raw.problems.length === 0) {
    problems.push(new UserError('the network has no reactions.', { file: raw.file }));
  }
  if (problems.length > 0) {
    throw new UserErrors(`${problems.length} problem${problems.length > 1 ? 's' : ''} in this network:`, problems, { file: raw.file });
  }
  return {
    name: raw.name,
    file: raw.file,
    description: raw.description,
    species,
    speciesIndex,
    speciesData,
    reactions,
    contentHash: raw.contentHash,
  };
}

function assembleReaction(entry: RawReaction, raw: RawNetwork, index: number, problems: UserError[]): Reaction | undefined {
  const before = problems.length;
  const fail = (message: string, field?: string): void => {
    problems.push(new UserError(message, entry.locate(field)));
  };
  if (!isRateLawName(entry.law)) {
    fail(`unknown rate law '${entry.law}'; expected one of ${RATE_LAW_NAMES.filter((n) => !RATE_LAWS[n].derivedOnly).join(', ')}.`, 'law');
    return undefined;
  }
  const law = RATE_LAWS[entry.law];
  if (law.derivedOnly) {
    fail(`the law ${law.name} is made by the model from the network's surface reactions when the grain option asks for it; a network does not list it. Remove the entry and set the grain option (docs/ice-nondiffusive.md).`, 'law');
    return undefined;
  }
  const reactants = parseAll(entry.reactants, 'reactants', fail);
  const products = parseAll(entry.products, 'products', fail);
  if (entry.reactants.length !== law.reactantCount) {
    fail(`the law ${law.name} takes ${law.reactantCount} reactant${law.reactantCount > 1 ? 's' : ''}; found ${entry.reactants.length} (${entry.reactants.join(', ')}).`, 'reactants');
  }
  if (entry.products.length === 0) fail('a reaction needs at least one product.', 'products');
  if (reactants && products) checkPhases(law, reactants, products, fail);
  const params = checkParams(law, entry, fail);
  let tmin = DEFAULT_TMIN;
  let tmax = DEFAULT_TMAX;
  if (entry.temperature) {
    if (!GAS_TEMPERATURE_LAWS.has(law.name)) {
      fail(`the law ${law.name} does not depend on the gas temperature, so a temperature range has no meaning here; remove 'temperature'.`, 'temperature');
    } else {
      [tmin, tmax] = entry.temperature;
      // T is clamped into the range, and the laws divide by T: 0 K cannot be an edge.
      if (!(Number.isFinite(tmin) && Number.isFinite(tmax) && tmin > 0 && tmax > 0)) {
        fail(`the temperature range must be two positive finite temperatures [tmin, tmax] in K; found [${tmin}, ${tmax}].`, 'temperature');
      }
    }
  }
  const f = entry.uncertaintyFactor;
  if (f !== undefined && !(Number.isFinite(f) && f >= 1)) {
    fail(`the uncertainty factor must be a number of at least 1 (F = 1: the coefficient is exact; 1.25 a well-measured ion-molecule reaction, 2-10 estimated ones, docs/physics.md section 13); found ${f}.`, 'uncertainty_factor');
  }
  if (problems.length > before || !params) return undefined;
  return {
    index,
    reactants: entry.reactants,
    products: entry.products,
    law: law.name,
    params,
    tmin,
    tmax,
    origin: entry.origin ?? raw.origin ?? '',
    ...(f !== undefined ? { uncertaintyFactor: f } : {}),
    source: entry.source,
  };
}

function parseAll(names: string[], field: string, fail: (m: string, f?: string) => void): Species[] | undefined {
  const out: Species[] = [];
  let ok = true;
  names.forEach((name, i) => {
    const s = tryParseSpecies(name);
    if (typeof s === 'string') {
      fail(`${s} ${UNPARSEABLE_HINT}`, `${field}[${i}]`);
      ok = false;
    } else out.push(s);
  });
  return ok ? out : undefined;
}

function checkPhases(law: RateLaw, reactants: Species[], products: Species[], fail: (m: string, f?: string) => void): void {
  const mantle = [...reactants, ...products].filter((s) => s.phase === 'mantle');
  if (mantle.length > 0) {
    fail(
      `${mantle.map((s) => s.name).join(', ')} ${mantle.length > 1 ? 'are mantle species' : 'is a mantle species'}: the inert bulk ice takes part in no reaction, and material moves between surface and mantle by the transfer the model derives when grain.mantle is on (docs/ice-mantle.md). Write the reaction with the surface species, ${mantle.map((s) => iceName(s.gasName)).join(', ')}.`,
    );
    return;
  }
  reactants.forEach((s, i) => {
    if (s.phase !== law.reactantPhase) {
      fail(`the law ${law.name} takes ${law.reactantPhase === 'ice' ? 'ice reactants (written X(s))' : 'gas-phase reactants'}; ${s.name} is ${s.phase === 'ice' ? 'an ice' : 'a gas'} species.`, `reactants[${i}]`);
    }
  });
  if (law.productPhase !== 'any') {
    products.forEach((s, i) => {
      if (s.phase !== law.productPhase) {
        fail(`the law ${law.name} makes ${law.productPhase === 'ice' ? 'ice products (written X(s))' : 'gas-phase products'}; ${s.name} is ${s.phase === 'ice' ? 'an ice' : 'a gas'} species.`, `products[${i}]`);
      }
    });
  }
  if (law.reactantPhase === 'ice' || law.productPhase === 'ice') {
    [...reactants, ...products].forEach((s) => {
      if (s.isElectron || (s.charge !== 0 && law.name === 'accretion')) {
        fail(`the grain process ${law.name} involves neutral species only; found ${s.name}.`);
      }
    });
  }
  if (PHASE_CHANGE_LAWS.has(law.name) && reactants.length === 1) {
    const r = reactants[0];
    const expected = r.phase === 'gas' ? iceName(r.gasName) : r.gasName;
    if (products.length !== 1 || products[0].name !== expected) {
      fail(`the law ${law.name} moves one species between gas and ice: ${r.name} -> ${expected}; found products ${products.map((p) => p.name).join(', ') || 'none'}.`, 'products');
    }
  }
  if (law.name === 'parametric-h2') {
    const ok = reactants.length === 2 && reactants.every((s) => s.name === 'H') && products.length === 1 && products[0].name === 'H2';
    if (!ok) fail('the law parametric-h2 is H2 formation on grains at a fixed rate: write it as reactants [H, H], products [H2].');
  }
}

function checkParams(law: RateLaw, entry: RawReaction, fail: (m: string, f?: string) => void): Record<string, number> | undefined {
  const known = new Set(law.params.map((p) => p.name));
  const params: Record<string, number> = {};
  let ok = true;
  for (const name of Object.keys(entry.params)) {
    if (!known.has(name)) {
      const takes = law.params.length === 0 ? 'takes no parameters' : `takes ${law.params.map((p) => p.name).join(', ')}`;
      fail(`the law ${law.name} has no parameter '${name}' (it ${takes}); remove it or check the law.`, name);
      ok = false;
    }
  }
  for (const p of law.params) {
    const value = entry.params[p.name];
    if (value === undefined) {
      if (p.default === undefined) {
        fail(`missing the parameter '${p.name}' of the law ${law.name} (${p.description}). Add it.`, p.name);
        ok = false;
      } else params[p.name] = p.default;
      continue;
    }
    if (!Number.isFinite(value)) {
      fail(`the parameter '${p.name}' must be a finite number; found ${value}.`, p.name);
      ok = false;
    } else if (p.min !== undefined && value < p.min) {
      fail(`the parameter '${p.name}' of the law ${law.name} must be at least ${p.min} (${p.description}); found ${value}.`, p.name);
      ok = false;
    } else params[p.name] = value;
  }
  return ok ? params : undefined;
}

export function describeLocation(loc: ErrorLocation): string {
  if (!loc.file) return 'earlier';
  if (loc.line !== undefined) return `at ${loc.file}:${loc.line}`;
  if (loc.row !== undefined) return `at ${loc.file} row ${loc.row}`;
  return `in ${loc.file}`;
}
