/**
 * Scratch folders of the tests: made in the temp folder and removed after the
 * test file that made them (test/support/setup.ts), so a test run leaves
 * nothing behind (test/support/global-setup.ts checks it).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const made: string[] = [];

/** A fresh folder `<tmp>/<prefix>XXXXXX`, removed when the test file ends. */
export function scratch(prefix = 'hoarfrost-test-'): string {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  made.push(dir);
  return dir;
}

/** Remove every scratch folder made so far (the file's afterAll). */
export function removeScratch(): void {
  for (const dir of made.splice(0)) rmSync(dir, { recursive: true, force: true });
}
