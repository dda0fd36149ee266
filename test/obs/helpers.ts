/** Shared pieces of the observation tests: a scratch folder and a section with defaults. */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { observationsSection, type ObservationsSection, type ObservationsSectionInput } from '../../src/config/sections/observations.ts';
import { scratch as scratchFolder } from '../support/scratch.ts';

/** A scratch folder, removed after the test file (test/support/scratch.ts). */
export function scratch(prefix = 'hoarfrost-obs-'): string {
  return scratchFolder(prefix);
}

export function section(input: ObservationsSectionInput): ObservationsSection {
  return observationsSection.parse(input);
}

export function write(dir: string, name: string, text: string | Uint8Array): string {
  const file = join(dir, name);
  writeFileSync(file, text);
  return file;
}

/** Deterministic doubles with all 53 bits of mantissa in use, spread over [lo, lo * 10^decades). */
export function fullPrecisionValues(n: number, lo: number, decades: number, seed = 12345): number[] {
  let state = seed >>> 0;
  const next = () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 2 ** 32;
  };
  return Array.from({ length: n }, () => lo * 10 ** (decades * next()) * (1 + next() * 2 ** -20));
}
