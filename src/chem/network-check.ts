/**
 * The checks of `hoarfrost network check`: what a loaded network says about
 * itself as a whole. Errors make a network unfit to run (a reaction that
 * creates or destroys atoms or charge, the same reaction twice, an inverted
 * temperature range, a reactive-desorption channel without its surface
 * reaction); warnings point at chemistry that may be intended but is often a
 * slip (a species only made or only destroyed, a gas neutral that never
 * freezes out, an ice with no way back to the gas, an ice that no surface
 * reaction destroys).
 */
import { UserError, UserErrors } from '../config/errors.ts';
import { RATE_LAW_NAMES, RATE_LAWS, type RateLawName } from './laws.ts';
import { rateBoundProblem } from './rate-bounds.ts';
import type { Network, Reaction, SourceLocation } from './network-types.ts';
import { iceName, parseSpecies, type Species } from './species.ts';
import { DEFAULT_UNCERTAINTY_FACTORS, reactionsAtDefaultFactor } from './uncertainty.ts';

export type Severity = 'error' | 'warning';

export type ProblemKind =
  | 'elements'
  | 'charge'
  | 'duplicate'
  | 'inverted-range'
  | 'unpaired-reactive-desorption'
  | 'branching'
  | 'only-produced'
  | 'only-destroyed'
  | 'no-accretion'
  | 'no-desorption'
  | 'no-surface-sink'
  | 'unused-species'
  | 'rate-not-finite'
  | 'rate-above-bound';

export interface NetworkProblem {
  severity: Severity;
  kind: ProblemKind;
  message: string;
  /** Indices of the reactions concerned, in the network's order. */
  reactions: number[];
  species?: string;
  /** Where the (first) reaction concerned is written. */
  source?: SourceLocation;
}

export interface NetworkCounts {
  species: { total: number; gas: number; ice: number; ions: number; electrons: number };
  reactions: { total: number; byLaw: Record<RateLawName, number> };
}

/** The reactions the grain options would add (`network check --derive`). */
export interface DerivedReport {
  /** The grain switches asked for. */
  options: string[];
  byMechanism: Record<string, number>;
  reactions: { index: number; mechanism: string; label: string; reactants: string[]; products: string[] }[];
  notes: string[];
}

/** Which reactions give their own uncertainty factor F, and which are left at their law's default. */
export interface UncertaintyReport {
  given: number;
  /** Reactions left at a default, by law, with the default and its origin. */
  atDefault: { law: RateLawName; count: number; factor: number; origin: string; reactions: number[] }[];
}

export interface NetworkReport {
  name: string;
  file: string;
  contentHash: string;
  counts: NetworkCounts;
  errors: number;
  warnings: number;
  problems: NetworkProblem[];
  uncertainty: UncertaintyReport;
  derived?: DerivedReport;
}

/** Branching ratios of the surface channels of one reactant pair may differ from 1 by this much. */
const BRANCHING_TOLERANCE = 1e-6;

/** Element counts and charge of a reaction side agree when they differ by less than this. */
const CONSERVATION_TOLERANCE = 1e-9;

const DESORPTION_LAWS: ReadonlySet<RateLawName> = new Set<RateLawName>(['thermal-desorption', 'cr-desorption', 'photodesorption']);

export function reactionLabel(r: Reaction): string {
  return `${r.reactants.join(' + ')} -> ${r.products.join(' + ')} (${r.law})`;
}

export function checkNetwork(network: Network, derive?: { options: string[]; reactions: readonly Reaction[]; notes: readonly string[] }): NetworkReport {
  const problems: NetworkProblem[] = [];
  const speciesOf = (name: string): Species => network.species[network.speciesIndex.get(name) ?? -1] ?? parseSpecies(name);
  const add = (severity: Severity, kind: ProblemKind, message: string, reactions: Reaction[], species?: string): void => {
    problems.push({ severity, kind, message, reactions: reactions.map((r) => r.index), species, source: reactions[0]?.source });
  };

  for (const r of network.reactions) {
    checkConservation(r, speciesOf, add);
    if (r.tmin > r.tmax) add('error', 'inverted-range', `temperature range [${r.tmin}, ${r.tmax}] K is inverted (tmin > tmax) in ${reactionLabel(r)}; swap the two values.`, [r]);
    const bound = rateBoundProblem(r);
    if (bound) add('error', bound.kind, bound.message, [r]);
  }
  for (const r of derive?.reactions ?? []) checkConservation(r, speciesOf, add);
  checkDuplicates(network.reactions, add);
  checkSurfacePairs(network.reactions, add);
  checkSpeciesBalance(network, add);

  const byLaw = Object.fromEntries(RATE_LAW_NAMES.map((l) => [l, 0])) as Record<RateLawName, number>;
  for (const r of network.reactions) byLaw[r.law] += 1;
  const gas = network.species.filter((s) => s.phase === 'gas').length;
  const severityOrder = (p: NetworkProblem): number => (p.severity === 'error' ? 0 : 1);
  problems.sort((a, b) => severityOrder(a) - severityOrder(b) || (a.reactions[0] ?? Infinity) - (b.reactions[0] ?? Infinity));
  return {
    name: network.name,
    file: network.file,
    contentHash: network.contentHash,
    counts: {
      species: { total: network.species.length, gas, ice: network.species.length - gas, ions: network.species.filter((s) => s.charge !== 0 && !s.isElectron).length, electrons: network.species.filter((s) => s.isElectron).length },
      reactions: { total: network.reactions.length, byLaw },
    },
    errors: problems.filter((p) => p.severity === 'error').length,
    warnings: problems.filter((p) => p.severity === 'warning').length,
    problems,
    uncertainty: uncertaintyReport(network),
    ...(derive ? { derived: derivedReport(derive) } : {}),
  };
}

function uncertaintyReport(network: Network): UncertaintyReport {
  const byLaw = new Map<RateLawName, number[]>();
  for (const r of reactionsAtDefaultFactor(network)) byLaw.set(r.law, [...(byLaw.get(r.law) ?? []), r.index]);
  return {
    given: network.reactions.filter((r) => r.uncertaintyFactor !== undefined).length,
    atDefault: [...byLaw].map(([law, reactions]) => ({ law, count: reactions.length, ...DEFAULT_UNCERTAINTY_FACTORS[law], reactions })),
  };
}

function derivedReport(derive: { options: string[]; reactions: readonly Reaction[]; notes: readonly string[] }): DerivedReport {
  const byMechanism: Record<string, number> = {};
  for (const r of derive.reactions) byMechanism[r.derived!.mechanism] = (byMechanism[r.derived!.mechanism] ?? 0) + 1;
  return {
    options: derive.options,
    byMechanism,
    reactions: derive.reactions.map((r) => ({ index: r.index, mechanism: r.derived!.mechanism, label: r.derived!.label, reactants: r.reactants, products: r.products })),
    notes: [...derive.notes],
  };
}

/**
 * For a caller about to run a network: throws the check's errors (located,
 * all of them) and returns the report when there are none.
 */
export function assertNetworkClean(network: Network): NetworkReport {
  const report = checkNetwork(network);
  if (report.errors === 0) return report;
  const problems = report.problems.filter((p) => p.severity === 'error').map((p) => new UserError(p.message, { file: p.source?.file, line: p.source?.line, row: p.source?.row }));
  throw new UserErrors(`the network ${network.name} has ${problems.length} error${problems.length > 1 ? 's' : ''} (hoarfrost network check ${network.file} lists them with the warnings):`, problems, { file: network.file });
}

type Add = (severity: Severity, kind: ProblemKind, message: string, reactions: Reaction[], species?: string) => void;

function checkConservation(r: Reaction, speciesOf: (n: string) => Species, add: Add): void {
  const balance = new Map<string, number>();
  let charge = 0;
  for (const [names, sign] of [[r.reactants, 1], [r.products, -1]] as const) {
    for (const name of names) {
      const s = speciesOf(name);
      charge += sign * s.charge;
      for (const [el, n] of Object.entries(s.elements)) balance.set(el, (balance.get(el) ?? 0) + sign * n);
    }
  }
  const off = [...balance].filter(([, n]) => Math.abs(n) > CONSERVATION_TOLERANCE);
  if (off.length > 0) {
    const detail = off.map(([el, n]) => `${el} ${n > 0 ? `${n} more in the reactants` : `${-n} more in the products`}`).join(', ');
    add('error', 'elements', `elements not conserved in ${reactionLabel(r)}: ${detail}.`, [r]);
  }
  if (Math.abs(charge) > CONSERVATION_TOLERANCE) {
    add('error', 'charge', `charge not conserved in ${reactionLabel(r)}: reactants carry ${fmtCharge(sideCharge(r.reactants, speciesOf))}, products ${fmtCharge(sideCharge(r.products, speciesOf))}.`, [r]);
  }
}

function sideCharge(names: string[], speciesOf: (n: string) => Species): number {
  return names.reduce((q, n) => q + speciesOf(n).charge, 0);
}

function fmtCharge(q: number): string {
  return q > 0 ? `+${q}` : String(q);
}

/** Reactants and products as multisets: the key of "the same reaction". */
function reactionKey(r: Reaction): string {
  return `${[...r.reactants].sort().join(' + ')} -> ${[...r.products].sort().join(' + ')} | ${r.law}`;
}

/**
 * Two entries of the same reaction and law are a duplicate when their
 * temperature ranges overlap; disjoint (or only touching) ranges are the
 * legitimate pieces of one fit over several temperature intervals.
 */
function checkDuplicates(reactions: Reaction[], add: Add): void {
  const groups = new Map<string, Reaction[]>();
  for (const r of reactions) {
    const key = reactionKey(r);
    const g = groups.get(key);
    if (g) g.push(r);
    else groups.set(key, [r]);
  }
  for (const group of groups.values()) {
    if (group.length < 2) continue;
    for (let i = 0; i < group.length; i++) {
      for (let j = i + 1; j < group.length; j++) {
        const a = group[i];
        const b = group[j];
        const lo = Math.max(Math.min(a.tmin, a.tmax), Math.min(b.tmin, b.tmax));
        const hi = Math.min(Math.max(a.tmin, a.tmax), Math.max(b.tmin, b.tmax));
        if (lo < hi || (a.tmin === b.tmin && a.tmax === b.tmax)) {
          add('error', 'duplicate', `${reactionLabel(b)} duplicates the reaction at ${where(a.source)} (temperature ranges [${a.tmin}, ${a.tmax}] and [${b.tmin}, ${b.tmax}] K overlap). Remove one, or split the ranges.`, [b, a]);
        }
      }
    }
  }
}

/**
 * A reactive-desorption channel releases a share of a surface reaction to
 * the gas, so it needs a surface reaction of the same reactants; and the
 * branching ratios of the surface channels of one reactant pair add up to 1.
 */
function checkSurfacePairs(reactions: Reaction[], add: Add): void {
  const surface = new Map<string, Reaction[]>();
  const pairKey = (r: Reaction): string => [...r.reactants].sort().join(' + ');
  for (const r of reactions) {
    if (r.law !== 'surface') continue;
    const g = surface.get(pairKey(r));
    if (g) g.push(r);
    else surface.set(pairKey(r), [r]);
  }
  for (const r of reactions) {
    if (r.law === 'reactive-desorption' && !surface.has(pairKey(r))) {
      add('error', 'unpaired-reactive-desorption', `${reactionLabel(r)} has no surface reaction of the same reactants to pair with; add the surface reaction ${r.reactants.join(' + ')} -> ... (law surface).`, [r]);
    }
  }
  for (const [pair, group] of surface) {
    const sum = group.reduce((s, r) => s + (r.params.branching ?? 1), 0);
    if (Math.abs(sum - 1) > BRANCHING_TOLERANCE) {
      add('warning', 'branching', `the branching ratios of the ${group.length} surface channel${group.length > 1 ? 's' : ''} of ${pair} add up to ${Number(sum.toPrecision(6))}, not 1.`, group);
    }
  }
}

/**
 * Species balance, and the ways out of an ice. An ice counts as having a
 * surface sink only when a surface (Langmuir-Hinshelwood) reaction consumes
 * it. Desorption does not count: thermal desorption at 10 K is no way out for
 * anything bound by more than a few hundred K (residence times beyond the age
 * of a cloud), and cosmic-ray and photodesorption remove of order 1e-3 per
 * photon or event, far slower than accretion feeds an ice. Ice photolysis
 * does not count either: it is a slow background sink that every species
 * with a gas photoreaction would have, so counting it would silence the
 * warning for exactly the runaway ices it exists to find (HNO(s), H2O2(s)).
 * The warning applies only to networks with surface chemistry: in a network
 * with freeze-out alone the ices are inert by design. A species entry's
 * no_surface_sink reason silences it (a stable end product of the ice).
 */
function checkSpeciesBalance(network: Network, add: Add): void {
  const made = new Map<string, Reaction>();
  const destroyed = new Map<string, Reaction>();
  const accreting = new Set<string>();
  const desorbing = new Set<string>();
  const surfaceSink = new Set<string>();
  let hasSurfaceChemistry = false;
  for (const r of network.reactions) {
    if (r.law === 'surface') {
      hasSurfaceChemistry = true;
      for (const name of r.reactants) if (!r.products.includes(name)) surfaceSink.add(name);
    }
    for (const name of r.products) if (!r.reactants.includes(name) && !made.has(name)) made.set(name, r);
    for (const name of r.reactants) if (!r.products.includes(name) && !destroyed.has(name)) destroyed.set(name, r);
    if (r.law === 'accretion') accreting.add(r.reactants[0]);
    if (DESORPTION_LAWS.has(r.law)) desorbing.add(r.reactants[0]);
  }
  const used = new Set(network.reactions.flatMap((r) => [...r.reactants, ...r.products]));
  for (const s of network.species) {
    // A mantle species is in no reaction by design: the model moves it to and from its surface twin (docs/ice-mantle.md).
    if (s.phase === 'mantle') continue;
    if (!used.has(s.name)) {
      add('warning', 'unused-species', `${s.name} is in the species list but in no reaction.`, [], s.name);
      continue;
    }
    const m = made.get(s.name);
    const d = destroyed.get(s.name);
    if (m && !d) add('warning', 'only-produced', `${s.name} is produced but never destroyed: it can only accumulate.`, [m], s.name);
    if (d && !m) add('warning', 'only-destroyed', `${s.name} is destroyed but never produced: it can only be used up.`, [d], s.name);
    if (s.phase === 'gas' && !s.isElectron && s.charge === 0 && !accreting.has(s.name)) {
      add('warning', 'no-accretion', `the gas neutral ${s.name} never freezes out: add ${s.name} -> ${iceName(s.name)} (law accretion).`, [], s.name);
    }
    if (s.phase === 'ice' && !desorbing.has(s.name)) {
      add('warning', 'no-desorption', `the ice ${s.name} has no way back to the gas (no thermal-desorption, cr-desorption or photodesorption).`, [], s.name);
    }
    if (hasSurfaceChemistry && s.phase === 'ice' && !surfaceSink.has(s.name) && network.speciesData.get(s.gasName)?.noSurfaceSink === undefined) {
      add(
        'warning',
        'no-surface-sink',
        `no surface reaction destroys the ice ${s.name}: on cold dust it can only pile up (desorption and ice photolysis are slow there). Add its surface chemistry, or say why it has none with no_surface_sink: "<reason>" in the species entry of ${s.gasName}.`,
        [],
        s.name,
      );
    }
  }
}

function where(source: SourceLocation): string {
  if (source.line !== undefined) return `${source.file}:${source.line}`;
  if (source.row !== undefined) return `${source.file} row ${source.row}`;
  return source.file;
}

/** Human-readable report: counts, then errors and warnings with their file:line. */
export function formatReport(report: NetworkReport): string {
  const lines: string[] = [];
  const { species, reactions } = report.counts;
  lines.push(`network ${report.name} (${report.file})`);
  lines.push(`content sha256 ${report.contentHash}`);
  lines.push('');
  lines.push(`species   ${pad(String(species.total), 6)} gas ${species.gas} (neutral ${species.gas - species.ions - species.electrons}, ions ${species.ions}${species.electrons ? ', e-' : ''}), ice ${species.ice}`);
  lines.push(`reactions ${pad(String(reactions.total), 6)}`);
  const listable = RATE_LAW_NAMES.filter((l) => !RATE_LAWS[l].derivedOnly);
  const width = Math.max(...RATE_LAW_NAMES.map((l) => l.length));
  for (const law of listable) lines.push(`  ${law.padEnd(width)}  ${pad(String(reactions.byLaw[law]), 6)}`);
  if (report.derived) {
    const d = report.derived;
    lines.push(`derived by ${d.options.join(', ')}: ${d.reactions.length} (the JSON report lists each)`);
    for (const [mechanism, n] of Object.entries(d.byMechanism)) lines.push(`  ${mechanism.padEnd(width)}  ${pad(String(n), 6)}`);
    for (const note of d.notes) lines.push(`  note: ${note}`);
  }
  const u = report.uncertainty;
  const defaulted = u.atDefault.reduce((n, d) => n + d.count, 0);
  lines.push(`uncertainty factors: ${u.given} given, ${defaulted} left at their law's default (docs/uncertainty.md)`);
  for (const d of u.atDefault) lines.push(`  ${d.law.padEnd(width)}  ${pad(String(d.count), 6)}  F = ${d.factor} (${d.origin})`);
  lines.push('');
  for (const severity of ['error', 'warning'] as const) {
    const list = report.problems.filter((p) => p.severity === severity);
    lines.push(`${severity}s: ${list.length}`);
    for (const p of list) {
      const at = p.source ? `${where(p.source)}: ` : '';
      lines.push(`  ${severity} [${p.kind}] ${at}${p.message}`);
    }
  }
  lines.push('');
  lines.push(report.errors === 0 ? `OK: no errors${report.warnings > 0 ? ` (${report.warnings} warning${report.warnings > 1 ? 's' : ''})` : ''}.` : `FAILED: ${report.errors} error${report.errors > 1 ? 's' : ''}.`);
  return lines.join('\n') + '\n';
}

function pad(s: string, n: number): string {
  return s.padStart(n);
}
