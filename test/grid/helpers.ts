/** Shared helpers of the grid tests: scratch folders and pipeline files on the tiny test network. */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { UserError } from '../../src/config/errors.ts';
import { scratch as scratchFolder } from '../support/scratch.ts';

export const TINY_NETWORK = fileURLToPath(new URL('./fixtures/tiny-network.yaml', import.meta.url));
export const FAKE_WORKER = new URL('./fixtures/fake-worker.ts', import.meta.url);
export const BIN = fileURLToPath(new URL('../../bin/hoarfrost.mjs', import.meta.url));

/** A scratch folder, removed after the test file (test/support/scratch.ts). */
export function scratch(prefix = 'hoarfrost-grid-'): string {
  return scratchFolder(prefix);
}

/** A pipeline file on the tiny network with the given conditions/exclude YAML (indented blocks). */
export function writePipeline(dir: string, body: string, name = 'pipeline.yaml'): string {
  const file = join(dir, name);
  writeFileSync(
    file,
    `name: grid-test
network: ${TINY_NETWORK}
initial: { H2: 0.5, CO: 1.0e-4 }
times: { start_yr: 1.0e3, end_yr: 1.0e7, count: 9 }
${body}`,
  );
  return file;
}

export function caught(fn: () => unknown): UserError {
  try {
    fn();
  } catch (e) {
    if (e instanceof UserError) return e;
    throw e;
  }
  throw new Error('expected a UserError');
}

export async function caughtAsync(fn: () => Promise<unknown>): Promise<UserError> {
  try {
    await fn();
  } catch (e) {
    if (e instanceof UserError) return e;
    throw e;
  }
  throw new Error('expected a UserError');
}
