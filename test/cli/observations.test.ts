/** `hoarfrost observations FILE|PIPELINE` end to end on the example files: what it prints, exit codes, bad input without a stack trace. */
import { readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../support/cli.ts';
import { scratch } from '../support/scratch.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const TABLE = join(ROOT, 'pipelines', 'examples', 'frostmere-ices.csv');
const MAP = join(ROOT, 'pipelines', 'examples', 'frostmere-map.fits');
const NETWORK = join(ROOT, 'config', 'networks', 'dark-cloud.yaml');

const hoarfrost = (args: string[], cwd = ROOT) => runCli(['observations', ...args], cwd);

describe('hoarfrost observations', () => {
  it('prints the example table as understood: A_K-derived A_V, optical-depth columns, limits, derived ratios', () => {
    const r = hoarfrost(['pipelines/examples/frostmere-ices.csv']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/frostmere-ices\.csv: csv table of 8 sightlines, 5 species/);
    expect(r.stdout).toMatch(/CH3OH\(s\): column from integrated optical depth \(CH3OH-3\.53um, A = 5\.3e-18 cm\/molecule\)/);
    // FM-03: A_K = 1.71 -> A_V = 1.71 / 0.112 = 15.27 mag (Rieke & Lebofsky 1985).
    expect(r.stdout).toMatch(/FM-03\s+15\.3 ± 0\.80 \(A_K\)/);
    // FM-03 NH3(s): 1.1e17 flagged '<' -> an upper limit.
    expect(r.stdout).toMatch(/FM-03 .*<1\.10e17/);
    // FM-04: CO(s)/H2O(s) = 9.8e17 / 2.41e18 = 0.4066, log10 = -0.391; errors
    // sqrt((1.1/9.8)^2 + (0.15/2.41)^2) / ln 10 = 0.056 and sqrt((1.3/9.8)^2 + (0.15/2.41)^2) / ln 10 = 0.064.
    const fm04 = r.stdout.split('\n').filter((l) => l.startsWith('FM-04'))[1];
    expect(fm04).toMatch(/-0\.39 -0\.06\/\+0\.06|-0\.39 ± 0\.06/);
    // FM-05 has a CO(s) upper limit: the ratio is an upper limit.
    expect(r.stdout.split('\n').filter((l) => l.startsWith('FM-05'))[1]).toMatch(/<-0\.56/);
  });

  it('prints the example FITS map with its grid', () => {
    const r = hoarfrost([MAP, '--rows', '3']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/fits map of 24 x 20 pixels, 312 with data, 2 species/);
    expect(r.stdout).toMatch(/WCS: axes RA---TAN, DEC--TAN/);
    expect(r.stdout).toMatch(/\.\.\. and 309 more/);
    expect(r.stdout).toMatch(/168 pixels have an extinction but no column density/);
  });

  it('reads the example YAML list and VOTable', () => {
    const y = hoarfrost(['pipelines/examples/frostmere-few.yaml']);
    expect(y.code).toBe(0);
    expect(y.stdout).toMatch(/yaml table of 2 sightlines, 4 species/);
    // FM-12: A_V = 1.95 / 0.112 = 17.4 mag; CO2(s) = 13.1 cm-1 / 7.6e-17 cm = 1.72e17 cm-2 (band strength: memory).
    expect(y.stdout).toMatch(/FM-12\s+17\.4 ± 0\.89 \(A_K\).*1\.72e17 ± 1\.8e16/);
    const v = hoarfrost(['pipelines/examples/frostmere-few.vot']);
    expect(v.code).toBe(0);
    // N(CO(s)) in units of 10+17cm-2 (CDS): 3.1 -> 3.10e17 cm-2.
    expect(v.stdout).toMatch(/FM-21\s+11\.2 ± 0\.60\s+1\.05e18 ± 9\.0e16\s+3\.10e17 ± 5\.0e16/);
    expect(v.stdout).toMatch(/FM-22 .*<1\.00e17/);
  });

  it('--json gives the set and the quantities', () => {
    const r = hoarfrost([TABLE, '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout) as { observations: { sightlines: { id: string; columns: Record<string, { kind: string; value: number }> }[] }; quantities: { label: string }[] };
    expect(j.observations.sightlines).toHaveLength(8);
    expect(j.observations.sightlines[0].columns['NH3(s)']).toEqual({ kind: 'upper', value: 8e16, confidence: 0.997 });
    expect(j.quantities.some((q) => q.label === 'X(CO2(s))')).toBe(true);
  });

  it("reads a pipeline's observations section with its settings and the fit's quantities, checking species against its network", () => {
    const dir = scratch('hoarfrost-obs-cli-');
    writeFileSync(join(dir, 'ices.csv'), readFileSync(TABLE));
    writeFileSync(join(dir, 'ices.columns.yaml'), readFileSync(TABLE.replace('.csv', '.columns.yaml')));
    const p = join(dir, 'p.yaml');
    writeFileSync(p, [
      `network: ${JSON.stringify(NETWORK)}`,
      'observations:',
      '  file: ices.csv',
      '  ice_threshold_av: 3',
      '  reference: CO(s)',
      'fit:',
      '  quantities:',
      '    - { species: H2O(s), as: abundance }',
      '    - { species: CO2(s), as: ratio }',
      '',
    ].join('\n'));
    const r = hoarfrost([p]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/ice threshold 3 mag/);
    const header = r.stdout.split('\n').find((l) => l.startsWith('sightline') && l.includes('X('))!;
    expect(header.split(/\s{2,}/)).toEqual(['sightline', 'X(H2O(s))', 'CO2(s)/CO(s)']);
    // FM-01: X = 6.1e17 / (1.87e21 * (8.4 - 3)) = 6.04e-5, log10 = -4.22.
    expect(r.stdout.split('\n').filter((l) => l.startsWith('FM-01'))[1]).toMatch(/^FM-01\s+-4\.22/);
  });

  it('columns of species outside the network (HCOOH(s), OCN-(s)) are carried with a note, and no quantity is derived from them', () => {
    const dir = scratch('hoarfrost-obs-cli-');
    writeFileSync(join(dir, 'more.csv'), 'id,AV,N(H2O(s)),N(H2O(s))_err,N(CO(s)),N(CO(s))_err,N(HCOOH(s)),N(HCOOH(s))_err,N(OCN-(s)),N(OCN-(s))_err\na,8,1e18,1e17,3e17,3e16,2e16,4e15,<1e16,\n');
    const r = hoarfrost(['more.csv', '--json', '--network', NETWORK], dir);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout) as { observations: { outsideNetwork: string[]; sightlines: { columns: Record<string, unknown> }[] }; quantities: { label: string }[]; warnings: string[] };
    expect(out.observations.outsideNetwork).toEqual(['HCOOH(s)', 'OCN-(s)']);
    expect(Object.keys(out.observations.sightlines[0].columns)).toEqual(['H2O(s)', 'CO(s)', 'HCOOH(s)', 'OCN-(s)']);
    expect(out.quantities.map((q) => q.label)).toEqual(['X(H2O(s))', 'X(CO(s))', 'CO(s)/H2O(s)']);
    for (const sp of ['HCOOH(s)', 'OCN-(s)']) expect(out.warnings.some((w) => w.includes(`species '${sp}'`) && w.includes('is not in the network: its column is read and kept, but it cannot be fitted'))).toBe(true);
  });

  it('bad input: exit 2, the file and column named, no stack trace', () => {
    const dir = scratch('hoarfrost-obs-cli-');
    writeFileSync(join(dir, 'bad.csv'), 'id,AV,N(CO(s)),N(CO(s))_err\na,5,-3e17,1e16\n');
    const r = hoarfrost(['bad.csv'], dir);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/^hoarfrost: bad\.csv:2, field 'N\(CO\(s\)\)': a column density must be positive/);
    expect(r.stderr).not.toMatch(/\n\s+at /);
    writeFileSync(join(dir, 'cut.fits'), readFileSync(MAP).subarray(0, 4000));
    const t = hoarfrost(['cut.fits', '--network', NETWORK], dir);
    expect(t.code).toBe(2);
    expect(t.stderr).toMatch(/cut\.fits: the FITS file is truncated/);
    const u = hoarfrost(['bad.csv', '--format', 'parquet'], dir);
    expect(u.code).toBe(2);
    expect(u.stderr).toMatch(/--format expects one of csv, tsv, yaml, votable, fits/);
  });
});
