/** How messages, notes and outputs name a reaction of a network. */
import type { Reaction } from './network-types.ts';

/** `A + B -> C + D`. */
export function describeReaction(r: { reactants: readonly string[]; products: readonly string[] }): string {
  return `${r.reactants.join(' + ')} -> ${r.products.join(' + ')}`;
}

/** A file's reaction by its number and equation, `reaction 12 (A + B -> C)`; a derived one by its derivation, `derived LABEL`. */
export function reactionLabel(r: Reaction): string {
  return r.derived ? `derived ${r.derived.label}` : `reaction ${r.index + 1} (${describeReaction(r)})`;
}
