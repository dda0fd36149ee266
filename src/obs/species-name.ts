/**
 * Species names as the observations room sees them: the network's formula
 * syntax (design.md), checked here only for its shape, since src/obs may
 * import nothing of src/chem. The network check proper is the caller's set
 * of known species (loadObservations' `knownSpecies`).
 */

/** IUPAC state symbol for a solid, the ice suffix of the network syntax. */
export const ICE_SUFFIX = '(s)';

/** An optional isomer prefix, an element symbol first, then symbols, digits and parentheses, charge signs at the end, `(s)` for ice. */
const SPECIES_SHAPE = /^(?:(?:l|c|t|o|p|cis|trans)-)?(?:[A-Z][A-Za-z0-9()]*|e)(?:\++|-+)?(?:\(s\))?$/;

export function isIceName(name: string): boolean {
  return name.endsWith(ICE_SUFFIX);
}

/** Undefined when the name has the shape of a species; otherwise why not. */
export function speciesNameProblem(name: string): string | undefined {
  if (name.length === 0) return 'it is empty';
  if (/\s/.test(name)) return 'it contains white space';
  if (!SPECIES_SHAPE.test(name)) return 'it is not a formula';
  return undefined;
}
