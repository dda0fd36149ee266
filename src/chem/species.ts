/**
 * Species names of the network: plain formulae with charge signs (`HCO+`,
 * `e-`), an optional isomer prefix (`l-C3H`, `c-C3H2`), and a state suffix:
 * the IUPAC state symbol `(s)` for ice (`H2O(s)`), and `(mantle)` for the
 * inert bulk ice beneath the reactive surface of the three-phase model
 * (`H2O(mantle)`; docs/ice-mantle.md). The name is the identity; the formula
 * gives element counts, charge and mass.
 */
import { UserError } from '../config/errors.ts';
import { ATOMIC_WEIGHTS, ELECTRON_MASS_AMU } from './elements.ts';

/** 'ice': the reactive ice (the surface layers when the mantle is on); 'mantle': the inert bulk ice below them. */
export type Phase = 'gas' | 'ice' | 'mantle';

export interface Species {
  /** Name as written in the network, e.g. `CO(s)`. */
  name: string;
  /** The same species in the gas phase (`CO` for `CO(s)` and `CO(mantle)`). */
  gasName: string;
  phase: Phase;
  /** Element symbol -> count; electrons are not an element. */
  elements: Readonly<Record<string, number>>;
  /** Charge in units of e. */
  charge: number;
  /** Mass in u (atomic weights, less the electrons an ion lost). */
  mass: number;
  isElectron: boolean;
}

export const ICE_SUFFIX = '(s)';
const MANTLE_SUFFIX = '(mantle)';
const ISOMER_PREFIX = /^(l|c|t|cis|trans|o|p)-/;

export function iceName(gasName: string): string {
  return gasName + ICE_SUFFIX;
}

export function isIceName(name: string): boolean {
  return name.endsWith(ICE_SUFFIX);
}

/** The mantle twin of a species: `H2O(mantle)` for `H2O` (or its ice `H2O(s)`'s gas name). */
export function mantleName(gasName: string): string {
  return gasName + MANTLE_SUFFIX;
}

/** Parse a species name; throws a UserError explaining what is wrong. */
export function parseSpecies(name: string): Species {
  const bad = (why: string): never => {
    throw new UserError(`'${name}' is not a species name: ${why}. Write a formula such as H2O, HCO+, e-, CO(s) or CO(mantle).`);
  };
  if (typeof name !== 'string' || name.length === 0) bad('it is empty');
  if (/\s/.test(name)) bad('it contains white space');
  let body = name;
  let phase: Phase = 'gas';
  if (body.endsWith(ICE_SUFFIX)) {
    phase = 'ice';
    body = body.slice(0, -ICE_SUFFIX.length);
  } else if (body.endsWith(MANTLE_SUFFIX)) {
    phase = 'mantle';
    body = body.slice(0, -MANTLE_SUFFIX.length);
  }
  const gasName = body;
  if (body === 'e-') {
    if (phase !== 'gas') bad(`electrons have no ${phase} form`);
    return { name, gasName: 'e-', phase: 'gas', elements: {}, charge: -1, mass: ELECTRON_MASS_AMU, isElectron: true };
  }
  let charge = 0;
  const chargeMatch = /([+-]+)$/.exec(body);
  if (chargeMatch) {
    const signs = chargeMatch[1];
    if (!/^(\++|-+)$/.test(signs)) bad('mixed charge signs');
    charge = signs[0] === '+' ? signs.length : -signs.length;
    body = body.slice(0, -signs.length);
  }
  if (phase !== 'gas' && charge !== 0) bad(`ions are not kept in the ${phase === 'ice' ? 'ice' : 'mantle'}`);
  const prefix = ISOMER_PREFIX.exec(body);
  if (prefix) body = body.slice(prefix[0].length);
  if (body.length === 0) bad('no elements');
  const elements: Record<string, number> = {};
  let i = 0;
  while (i < body.length) {
    const two = body.slice(i, i + 2);
    const one = body[i];
    let symbol: string;
    if (two.length === 2 && two[1] >= 'a' && two[1] <= 'z' && two in ATOMIC_WEIGHTS) symbol = two;
    else if (one in ATOMIC_WEIGHTS) symbol = one;
    else if (one >= 'A' && one <= 'Z') {
      const guess = two.length === 2 && two[1] >= 'a' && two[1] <= 'z' ? two : one;
      return bad(`unknown element '${guess}' at position ${i + 1 + (prefix?.[0].length ?? 0)} (known: ${Object.keys(ATOMIC_WEIGHTS).join(', ')})`);
    } else return bad(`unexpected character '${one}' at position ${i + 1 + (prefix?.[0].length ?? 0)}`);
    i += symbol.length;
    let digits = '';
    while (i < body.length && body[i] >= '0' && body[i] <= '9') digits += body[i++];
    if (digits.startsWith('0')) bad(`count '${digits}' after ${symbol} starts with 0`);
    const count = digits === '' ? 1 : Number(digits);
    elements[symbol] = (elements[symbol] ?? 0) + count;
  }
  let mass = 0;
  for (const [el, n] of Object.entries(elements)) mass += ATOMIC_WEIGHTS[el] * n;
  mass -= charge * ELECTRON_MASS_AMU;
  return { name, gasName, phase, elements, charge, mass, isElectron: false };
}

/** Parse without throwing: the error message or the species. */
export function tryParseSpecies(name: string): Species | string {
  try {
    return parseSpecies(name);
  } catch (e) {
    return (e as Error).message;
  }
}
