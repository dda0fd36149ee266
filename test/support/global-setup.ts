/**
 * The whole test run gets a temp folder of its own (TMPDIR, inherited by the
 * test processes and the CLI they start). At the end it must hold none of
 * the tests' scratch folders (named hoarfrost-* or hf-*): one left behind
 * fails the run, named. Other tools' caches there (tsx keeps tsx-<uid>) are
 * not ours to judge. The folder is removed either way.
 */
import { chmodSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** Names of the tests' scratch folders. */
const OURS = /^(hoarfrost|hf)-/;

export default function setup(): () => void {
  const outer = process.env.TMPDIR;
  const runDir = mkdtempSync(join(tmpdir(), 'hoarfrost-test-run-'));
  // Traversable by all, as the temp folder itself: munged (the Slurm test) refuses a socket below a folder others cannot traverse.
  chmodSync(runDir, 0o711);
  process.env.TMPDIR = runDir;
  return () => {
    const left = readdirSync(runDir).filter((name) => OURS.test(name));
    rmSync(runDir, { recursive: true, force: true });
    if (outer === undefined) delete process.env.TMPDIR;
    else process.env.TMPDIR = outer;
    if (left.length > 0) {
      // vitest prints an error thrown here but would still exit 0.
      process.exitCode = 1;
      throw new Error(`the tests left ${left.length} scratch folder(s) in the temp folder: ${left.join(', ')}; remove them in afterAll, or make them with scratch() of test/support/scratch.ts`);
    }
  };
}
