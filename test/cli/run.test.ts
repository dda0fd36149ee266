/** `hoarfrost run` and `hoarfrost init` through the real command line: bad input gives a clear error and no stack trace. */
import { cpSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { expectNoStack, runCli } from '../support/cli.ts';

const ROOT = join(import.meta.dirname, '../..');
const FIXTURES = join(ROOT, 'test/pipeline/fixtures');

const cli = runCli;


let dir: string;
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'hoarfrost-cli-run-'));
  for (const f of ['tiny-network.yaml', 'tiny-obs.csv', 'tiny-obs.columns.yaml', 'tiny-pipeline.yaml']) cpSync(join(FIXTURES, f), join(dir, f));
});
afterEach(() => rmSync(dir, { recursive: true, force: true }));

describe('hoarfrost run: bad input', () => {
  it('a pipeline pointing at a missing observations file: file, line, field and fix; exit 2', () => {
    writeFileSync(join(dir, 'p.yaml'), readFileSync(join(dir, 'tiny-pipeline.yaml'), 'utf8').replace('file: tiny-obs.csv', 'file: data/stars.csv'));
    const r = cli(['run', 'p.yaml'], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain("hoarfrost: p.yaml:7, field 'observations.file': the observations file data/stars.csv does not exist");
    expect(r.stderr).toContain('Paths are relative to the pipeline file');
    expectNoStack(r.stderr);
    // Nothing was run, so no store was made.
    expect(existsSync(join(dir, 'out/store'))).toBe(false);
  });

  it('an unknown stage name in --from or --only lists the stages; exit 2', () => {
    for (const flag of ['--from', '--only']) {
      const r = cli(['run', 'tiny-pipeline.yaml', flag, 'fitting'], dir);
      expect(r.code).toBe(2);
      expect(r.stderr).toBe(`hoarfrost: unknown stage 'fitting' for ${flag}. The stages are, in order: observe, grid, fit, report.\n`);
    }
  });

  it('--only on an output folder without earlier results says to run the whole pipeline first', () => {
    const r = cli(['run', 'tiny-pipeline.yaml', '--only', 'fit'], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/the fit stage needs the results of the observe stage, and there are none in .*Run the whole pipeline first: hoarfrost run PIPELINE\./);
    expectNoStack(r.stderr);
  });

  it('a missing pipeline file, a missing lock file, --lock with --check, a bad number: clear errors', () => {
    let r = cli(['run', 'none.yaml'], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('none.yaml: pipeline file not found');
    r = cli(['run', 'tiny-pipeline.yaml', '--check', 'none.lock.json'], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('none.lock.json: lock file not found. Write one first with `hoarfrost run PIPELINE --lock FILE`.');
    r = cli(['run', 'tiny-pipeline.yaml', '--lock', 'a.json', '--check', 'b.json'], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('give either --lock (write a lock file) or --check (compare with one), not both.');
    r = cli(['run', 'tiny-pipeline.yaml', '--workers', 'two'], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain("--workers expects a number, found 'two'.");
    for (const e of [r.stderr]) expectNoStack(e);
  });
});

describe('hoarfrost init', () => {
  it('makes a project folder and refuses to overwrite it', () => {
    const r = cli(['init', 'survey'], dir);
    expect(r.code).toBe(0);
    for (const f of ['pipeline.yaml', 'observations.csv', 'observations.columns.yaml', 'network.yaml', 'README.md']) expect(existsSync(join(dir, 'survey', f)), f).toBe(true);
    // The installed command, never `npx hoarfrost`: npx outside the clone asks the public registry for a package of that name.
    expect(r.stdout).toContain('next: hoarfrost run survey/pipeline.yaml');
    const readme = readFileSync(join(dir, 'survey/README.md'), 'utf8');
    expect(readme).toContain('    hoarfrost run survey/pipeline.yaml');
    expect(readme).not.toContain('npx');
    const before = readFileSync(join(dir, 'survey/pipeline.yaml'), 'utf8');
    writeFileSync(join(dir, 'survey/pipeline.yaml'), 'name: mine\n');
    const again = cli(['init', 'survey'], dir);
    expect(again.code).toBe(2);
    expect(again.stderr).toContain('survey: would overwrite pipeline.yaml, network.yaml, observations.csv, observations.columns.yaml, README.md; nothing was written. Choose an empty folder, or move these files away first.');
    expect(readFileSync(join(dir, 'survey/pipeline.yaml'), 'utf8')).toBe('name: mine\n');
    expect(before).toContain('hoarfrost run pipeline.yaml');
    expect(before).not.toContain('npx');
    expectNoStack(again.stderr);
  });
});
