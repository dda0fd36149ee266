/**
 * The reactions the grain options add to a network's own (docs/ice-nondiffusive.md):
 * ice photolysis first (src/chem/ice-photolysis.ts), then the non-diffusive
 * reactions (src/chem/nondiffusive.ts), whose photodissociation-induced
 * channels follow from the network's listed and derived ice photolysis.
 * Structural only: the rates are set for given conditions by computeRates.
 */
import type { GrainOptions } from '../config/conditions.ts';
import { deriveIcePhotolysis, type DerivedReactions } from './ice-photolysis.ts';
import type { Network, Reaction } from './network-types.ts';
import { deriveNonDiffusive } from './nondiffusive.ts';

export type DerivingOptions = Pick<GrainOptions, 'icePhotolysis' | 'icePhotolysisFactor' | 'threeBody' | 'eleyRideal' | 'photodissociationInduced'>;

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
  return { reactions, notes };
}
