/**
 * Content hashes for stage inputs and outputs: sha256 over a canonical JSON
 * form (object keys sorted, so key order in a YAML file does not matter) and
 * over file contents. Paths never enter a hash, only contents, so the same
 * pipeline in another folder or on a fresh clone hashes the same.
 */
import { createHash } from 'node:crypto';
import { readFileSync, statSync } from 'node:fs';

/** JSON with object keys sorted at every level; undefined members are left out, as JSON.stringify does. */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(sortKeys(value));
}

function sortKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(sortKeys);
  if (value !== null && typeof value === 'object' && !(value instanceof Date)) {
    const out: Record<string, unknown> = {};
    for (const key of Object.keys(value as Record<string, unknown>).sort()) {
      const v = (value as Record<string, unknown>)[key];
      if (v !== undefined) out[key] = sortKeys(v);
    }
    return out;
  }
  return value;
}

export function sha256(data: string | Uint8Array): string {
  return createHash('sha256').update(data).digest('hex');
}

export function hashValue(value: unknown): string {
  return sha256(canonicalJson(value));
}

/** sha256 of a file's bytes, or undefined when it does not exist. */
export function hashFile(file: string): string | undefined {
  try {
    if (!statSync(file).isFile()) return undefined;
    return sha256(readFileSync(file));
  } catch {
    return undefined;
  }
}

/**
 * One hash over several files, each entered under a caller-chosen key (a
 * path relative to some folder, or a role such as `network`) so that the
 * hash does not depend on where the files live. A missing file enters as
 * `missing`, so creating it changes the hash.
 */
export function hashFiles(files: Readonly<Record<string, string>>): string {
  const entries: Record<string, string> = {};
  for (const [key, file] of Object.entries(files)) entries[key] = hashFile(file) ?? 'missing';
  return hashValue(entries);
}
