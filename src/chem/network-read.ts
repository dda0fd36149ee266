/**
 * What the two network readers (YAML network, mapped table) share: reading
 * the file bytes that the content hash is made of, the schema of a species
 * entry, and collecting problems instead of stopping at the first.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { z } from 'zod';
import { UserError, UserErrors } from '../config/errors.ts';
import { readTextFile } from '../config/yaml.ts';

/**
 * One species entry: binding energy E_D/k_B in K, mass in u where not from
 * the formula, and, for an ice that no surface reaction destroys on purpose,
 * the reason (it silences the check's no-surface-sink warning).
 */
export const speciesEntrySchema = z.strictObject({
  name: z.string(),
  binding_energy: z.number().optional(),
  mass: z.number().optional(),
  no_surface_sink: z.string().optional(),
  origin: z.string().optional(),
});

/** Run a reader step; a UserError (or several) is recorded instead of thrown. */
export function collect<T>(problems: UserError[], step: () => T): T | undefined {
  try {
    return step();
  } catch (e) {
    if (e instanceof UserErrors) problems.push(...e.problems);
    else if (e instanceof UserError) problems.push(e);
    else throw e;
    return undefined;
  }
}

/** The bytes of a file; a missing or unreadable file is a UserError naming it. */
export function readBytes(file: string, what: string): Buffer {
  try {
    return readFileSync(file);
  } catch {
    readTextFile(file, what);
    throw new UserError(`cannot read ${what}.`, { file });
  }
}

/** sha256 (hex) of one file, or of the digests of several files in order. */
export function sha256(...parts: Buffer[]): string {
  const h = createHash('sha256');
  if (parts.length === 1) h.update(parts[0]);
  else for (const p of parts) h.update(createHash('sha256').update(p).digest());
  return h.digest('hex');
}
