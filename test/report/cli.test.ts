/**
 * `hoarfrost report PIPELINE` through the real command line, on a tiny
 * pipeline run once: it redraws the report alone after a change of the
 * `report:` section, and refuses a figure that does not exist or a name that
 * would leave the output folder with a clear error, exit 2 and no stack trace.
 */
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectNoStack, runCli } from '../support/cli.ts';

const ROOT = join(import.meta.dirname, '../..');
const FIXTURES = join(ROOT, 'test/pipeline/fixtures');

const cli = runCli;


let dir: string;
let pipelineText: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'hoarfrost-cli-report-'));
  for (const f of ['tiny-network.yaml', 'tiny-obs.csv', 'tiny-obs.columns.yaml', 'tiny-pipeline.yaml']) cpSync(join(FIXTURES, f), join(dir, f));
  pipelineText = readFileSync(join(dir, 'tiny-pipeline.yaml'), 'utf8');
  const r = cli(['run', 'tiny-pipeline.yaml'], dir);
  expect(r.code, r.stderr).toBe(0);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('hoarfrost report', () => {
  it('redraws only the report after its section changed', () => {
    expect(existsSync(join(dir, 'out/report/figures/fit_vs_av.png'))).toBe(false);
    writeFileSync(join(dir, 'tiny-pipeline.yaml'), pipelineText.replace('formats: [svg]', 'formats: [svg, png]\n  png_dpi: 72'));
    const r = cli(['report', 'tiny-pipeline.yaml'], dir);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^fit +not run/m);
    expect(r.stdout).toMatch(/^report +ran/m);
    expect(r.stdout).toContain('out/report/index.html');
    expect(existsSync(join(dir, 'out/report/figures/fit_vs_av.png'))).toBe(true);
  });

  it('refuses a figure that does not exist, naming file, line and the kinds', () => {
    writeFileSync(join(dir, 'bad-kind.yaml'), pipelineText.replace('formats: [svg]', 'formats: [svg]\n  figures: [tracks, histogram]'));
    const r = cli(['report', 'bad-kind.yaml'], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/bad-kind\.yaml:\d+, field 'report\.figures\[1\]': unknown figure kind; the report draws: chi2_map, tracks, fit_vs_av, profiles, sky_map/);
    expectNoStack(r.stderr);
  });

  it('refuses a figure name that would leave the output folder and writes nothing there', () => {
    const before = readdirSync(dir).sort();
    writeFileSync(join(dir, 'bad-name.yaml'), pipelineText.replace('formats: [svg]', "formats: [svg]\n  figures: [{ kind: fit_vs_av, name: '../../x' }]"));
    const r = cli(['report', 'bad-name.yaml'], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain("field 'report.figures[0].name': the output name '../../x' is not allowed");
    expectNoStack(r.stderr);
    expect(readdirSync(dir).sort()).toEqual([...before, 'bad-name.yaml'].sort());
    expect(existsSync(join(dir, '..', 'x.svg'))).toBe(false);
  });
});
