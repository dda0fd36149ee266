/**
 * Ice photolysis by the external and the cosmic-ray induced UV field
 * (physics.md section 10): every gas-phase photoreaction of the network
 * (laws interstellar-uv and cosmic-ray-uv) of a neutral species whose reactant
 * and products all have an ice twin in the network gives the ice reaction
 * X(s) -> Y(s) + Z(s) at `factor` times the gas-phase rate, the external part
 * attenuated by the dust exactly as the gas rate is (same gamma).
 *
 * The factor is a model choice (grain.ice_photolysis_factor; default 1,
 * memory: Garrod, Widicus Weaver & Herbst 2008, ApJ 682, 283, take the
 * gas-phase rates for the ice). Channels whose products have no ice twin
 * (photoionisation: ions and electrons are not kept in the ice; or a
 * fragment the network has no ice form of) are left out and named in a note.
 *
 * A network may also list ice photolysis itself with the laws
 * ice-interstellar-uv and ice-cosmic-ray-uv (for channels without a gas
 * counterpart); a listed channel is not derived a second time.
 *
 * `twin` names the ice form of a gas species, so a second ice phase (a bulk
 * mantle) is photolysed with one more call giving its own suffix.
 */
import type { Network, Reaction } from './network-types.ts';
import { iceName, tryParseSpecies } from './species.ts';
import { describeReaction } from './reaction-text.ts';

export interface DerivedReactions {
  reactions: Reaction[];
  /** What was left out and why, for the run's notes. */
  notes: string[];
}

const GAS_TO_ICE_LAW = { 'interstellar-uv': 'ice-interstellar-uv', 'cosmic-ray-uv': 'ice-cosmic-ray-uv' } as const;

function channelKey(law: string, reactant: string, products: readonly string[]): string {
  return `${law}: ${reactant} > ${[...products].sort().join(' ')}`;
}

/**
 * Derive the ice photolysis channels of one ice phase.
 * @param factor ice rate over the gas-phase rate
 * @param firstIndex index given to the first derived reaction (they follow the network's own)
 * @param twin the ice form of a gas species name (default `X(s)`)
 */
export function deriveIcePhotolysis(network: Network, factor: number, firstIndex: number, twin: (gasName: string) => string = iceName): DerivedReactions {
  const listed = new Set<string>();
  for (const r of network.reactions) {
    if (r.law === 'ice-interstellar-uv' || r.law === 'ice-cosmic-ray-uv') listed.add(channelKey(r.law, r.reactants[0], r.products));
  }
  const reactions: Reaction[] = [];
  const noTwin: string[] = [];
  const already: string[] = [];
  for (const r of network.reactions) {
    if (r.law !== 'interstellar-uv' && r.law !== 'cosmic-ray-uv') continue;
    const reactant = tryParseSpecies(r.reactants[0]);
    if (typeof reactant === 'string' || reactant.charge !== 0 || reactant.isElectron) continue;
    const iceReactant = twin(reactant.name);
    if (!network.speciesIndex.has(iceReactant)) continue;
    const missing = r.products.filter((p) => {
      const s = tryParseSpecies(p);
      return typeof s === 'string' || s.charge !== 0 || s.isElectron || !network.speciesIndex.has(twin(s.name));
    });
    if (missing.length > 0) {
      noTwin.push(`${describeReaction(r)} (${missing.join(', ')})`);
      continue;
    }
    const law = GAS_TO_ICE_LAW[r.law];
    const products = r.products.map(twin);
    if (listed.has(channelKey(law, iceReactant, products))) {
      already.push(`${iceReactant} -> ${products.join(' + ')}`);
      continue;
    }
    const params: Record<string, number> = { alpha: factor * r.params.alpha };
    if (law === 'ice-interstellar-uv') params.gamma = r.params.gamma;
    const reaction: Reaction = {
      index: firstIndex + reactions.length,
      reactants: [iceReactant],
      products,
      law,
      params,
      tmin: r.tmin,
      tmax: r.tmax,
      origin: `derived: ${factor} x the gas-phase rate of reaction ${r.index + 1} (${describeReaction(r)}; ${r.origin})`,
      source: r.source,
      derived: { mechanism: 'ice-photolysis', parents: [r], label: '' },
    };
    reaction.derived!.label = `ice photolysis ${describeReaction(reaction)} (from ${describeReaction(r)})`;
    reactions.push(reaction);
  }
  const notes: string[] = [];
  if (noTwin.length > 0) {
    notes.push(`ice photolysis: ${noTwin.length} gas-phase photoreaction${noTwin.length > 1 ? 's have' : ' has'} products without an ice form in the network, so no ice counterpart: ${noTwin.join('; ')}`);
  }
  if (already.length > 0) notes.push(`ice photolysis: the network lists ${already.join('; ')} itself; not derived again`);
  return { reactions, notes };
}
