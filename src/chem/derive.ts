/**
 * The reactions the grain options add to a network's own (docs/ice-nondiffusive.md):
 * ice photolysis first (src/chem/ice-photolysis.ts), then the non-diffusive
 * reactions (src/chem/nondiffusive.ts), whose photodissociation-induced
 * channels follow from the network's listed and derived ice photolysis;
 * with the three-phase ice, the encounter desorption of H2
 * (src/chem/encounter-desorption.ts).
 * Structural only: the rates are set for given conditions by computeRates.
 */
import type { GrainOptions } from '../config/conditions.ts';
import { deriveEncounterDesorption } from './encounter-desorption.ts';
import { deriveIcePhotolysis, type DerivedReactions } from './ice-photolysis.ts';
import type { Network, Reaction } from './network-types.ts';
import { deriveNonDiffusive } from './nondiffusive.ts';

export type DerivingOptions = Pick<GrainOptions, 'icePhotolysis' | 'icePhotolysisFactor' | 'threeBody' | 'eleyRideal' | 'photodissociationInduced' | 'mantle'>;

export function deriveReactions(network: Network, grain: DerivingOptions): DerivedReactions {
  const notes: string[] = [];
  let reactions: Reaction[] = [];
  if (grain.icePhotolysis) {
    const photolysis = deriveIcePhotolysis(network, grain.icePhotolysisFactor, network.reactions.length);
    reactions = photolysis.reactions;
    notes.push(...photolysis.notes);
  }
  if (grain.threeBody || grain.eleyRideal || grain.photodissociationInduced) {
    const photolysis = [...network.reactions.filter((r) => r.law === 'ice-interstellar-uv' || r.law === 'ice-cosmic-ray-uv'), ...reactions];
    reactions = [...reactions, ...deriveNonDiffusive(network, grain, photolysis, network.reactions.length + reactions.length)];
    if (grain.photodissociationInduced && photolysis.length === 0) {
      notes.push('photodissociation-induced reactions: the network has no ice photolysis (list some, or set grain.ice_photolysis), so there are none');
    }
  }
  // The three-phase ice brings H2 encounter desorption (docs/ice-mantle.md): without it H2 is buried in the mantle.
  if (grain.mantle) reactions = [...reactions, ...deriveEncounterDesorption(network, network.reactions.length + reactions.length)];
  return { reactions, notes };
}
