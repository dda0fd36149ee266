/** Running the real command line from tests, and what its errors must not show. */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { expect } from 'vitest';

export const ROOT = join(import.meta.dirname, '../..');
export const BIN = join(ROOT, 'bin/hoarfrost.mjs');

export interface CliResult {
  code: number | null;
  stdout: string;
  stderr: string;
}

/** `node bin/hoarfrost.mjs ARGS` in a folder, with the debug stack turned off. */
export function runCli(args: string[], cwd: string = ROOT, timeoutMs = 120_000): CliResult {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: 'utf8', timeout: timeoutMs, env: { ...process.env, HOARFROST_DEBUG: '' } });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** No stack trace: no `    at f (file:line)` frames and no "internal error". */
export function expectNoStack(stderr: string): void {
  expect(stderr).not.toMatch(/^\s+at .+:\d+/m);
  expect(stderr).not.toContain('internal error');
}
