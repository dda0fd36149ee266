/**
 * writeReport end to end on synthetic fit results: every file listed exists,
 * tables read back (CSV by d3-dsv, an RFC 4180 parser; JSON; LaTeX layout),
 * the FITS maps read by astropy with the WCS kept, output names that would
 * leave the output folder refused, and a figure that does not exist refused
 * with a clear error.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { csvParse } from 'd3-dsv';
import { beforeAll, describe, expect, it } from 'vitest';
import { UserError } from '../../src/config/errors.ts';
import { parseYamlText, validate } from '../../src/config/yaml.ts';
import { reportSection } from '../../src/config/sections/report.ts';
import { writeReport } from '../../src/report/index.ts';
import { carriedCards } from '../../src/report/maps.ts';
import { outputPath } from '../../src/report/paths.ts';
import { chi2DofText, numberHtml, numberLatex, numberText, pValueText } from '../../src/report/numbers.ts';
import type { ReportFiles } from '../../src/report/types.ts';
import { ASTROPY, needReference, PYTHON } from '../support/references.ts';
import { scratch as scratchFolder } from '../support/scratch.ts';
import { HOSTILE_NAMES, SIGHTLINES, syntheticInput } from './fixture.ts';

const scratch = (): string => scratchFolder('hoarfrost-report-');

function expectUserError(f: () => unknown, ...parts: (string | RegExp)[]): UserError {
  let caught: unknown;
  try {
    f();
  } catch (e) {
    caught = e;
  }
  expect(caught).toBeInstanceOf(UserError);
  for (const p of parts) expect((caught as Error).message).toMatch(p);
  return caught as UserError;
}

async function expectUserErrorAsync(p: Promise<unknown>, ...parts: (string | RegExp)[]): Promise<void> {
  const e = await p.then(
    () => undefined,
    (err: unknown) => err,
  );
  expect(e).toBeInstanceOf(UserError);
  for (const part of parts) expect((e as Error).message).toMatch(part);
}

describe('writeReport on a table of sightlines', () => {
  let dir: string;
  let files: ReportFiles;
  beforeAll(async () => {
    dir = scratch();
    files = await writeReport(syntheticInput({ config: { formats: ['svg', 'png', 'pdf'], png_dpi: 72 } }), join(dir, 'report'));
  });

  it('writes every file it lists, inside the report folder, and nothing else', () => {
    const root = resolve(dir, 'report');
    for (const f of files.all) {
      expect(existsSync(f), f).toBe(true);
      expect(f.startsWith(root + '/')).toBe(true);
    }
    const onDisk = [
      ...readdirSync(join(root, 'figures')).map((f) => join(root, 'figures', f)),
      ...readdirSync(join(root, 'tables')).map((f) => join(root, 'tables', f)),
      join(root, 'index.html'),
    ].sort();
    expect(onDisk).toEqual(files.all);
    expect(files.warnings).toEqual([]);
  });

  it('saves each figure as NAME.svg, NAME.png and NAME.pdf beside NAME.vl.json', () => {
    expect(files.figures).toHaveLength(19);
    for (const f of files.figures) {
      const stem = f.spec.replace(/\.vl\.json$/, '');
      expect(f.rendered).toEqual({ svg: `${stem}.svg`, png: `${stem}.png`, pdf: `${stem}.pdf` });
      expect(JSON.parse(readFileSync(f.spec, 'utf8')).$schema).toMatch(/vega-lite\/v6/);
    }
  });

  it('writes a CSV an RFC 4180 reader gives back exactly, hostile names included', () => {
    const rows = csvParse(readFileSync(files.tables.csv, 'utf8'));
    expect(rows.map((r) => r.sightline)).toEqual(SIGHTLINES);
    const input = syntheticInput();
    rows.forEach((r, i) => {
      const fit = input.fit.fits[i];
      expect(Number(r.density)).toBe(fit.best.parameters.density);
      expect(Number(r.age_yr)).toBe(fit.best.ageYr);
      expect(Number(r.chi2)).toBe(fit.best.chi2);
      const iv = fit.intervals.find((x) => x.parameter === 'density' && x.level === 0.683)!;
      expect([Number(r.density_lo), Number(r.density_hi)]).toEqual([iv.lo, iv.hi]);
      expect(r.density_at_edge).toBe(String(iv.loAtEdge || iv.hiAtEdge));
    });
    expect(rows.columns.slice(0, 6)).toEqual(['sightline', 'av_mag', 'density', 'density_lo', 'density_hi', 'density_at_edge']);
  });

  it('writes JSON with the same rows', () => {
    const json = JSON.parse(readFileSync(files.tables.json, 'utf8'));
    expect(json.format).toBe('hoarfrost-report-table/1');
    expect(json.level).toBe(0.683);
    expect(json.rows.map((r: { sightline: string }) => r.sightline)).toEqual(SIGHTLINES);
  });

  it('writes an AASTeX deluxetable with one escaped row per sightline', () => {
    const tex = readFileSync(files.tables.latex, 'utf8');
    expect(tex).toMatch(/\\begin\{deluxetable\*\}\{lrcccrr\}/);
    const body = tex.slice(tex.indexOf('\\startdata') + '\\startdata'.length, tex.indexOf('\\enddata')).trim();
    const rows = body.split(' \\\\\n');
    expect(rows).toHaveLength(SIGHTLINES.length);
    // AASTeX: no row separator after the last row.
    expect(body.endsWith('\\\\')).toBe(false);
    expect(rows[1].startsWith('\\textless{}script\\textgreater{}alert(1)\\textless{}/script\\textgreater{} & ')).toBe(true);
    expect(rows[2].startsWith('50\\%\\_\\&\\_\\#1 & ')).toBe(true);
    // Columns: sightline, A_V, three parameters, chi2/dof, p: six separators a row.
    for (const r of rows) expect(r.match(/(?<!\\)&/g)).toHaveLength(6);
    expect(tex).toContain('\\tablenotetext{a}');
    expect(tex).not.toContain('<script');
  });

  it('writes the same tables again byte for byte', async () => {
    const again = await writeReport(syntheticInput({ config: { formats: ['svg'] } }), join(scratch(), 'report'));
    for (const k of ['csv', 'json', 'latex'] as const) expect(readFileSync(again.tables[k])).toEqual(readFileSync(files.tables[k]));
  });

  it("marks unresolved intervals and poor fits at the fit stage's p-value", async () => {
    const input = syntheticInput({ config: { formats: ['svg'], figures: ['fit_vs_av'] } });
    const iv = input.fit.fits[0].intervals.find((i) => i.parameter === 'density' && i.level === 0.683)!;
    Object.assign(iv, { lo: iv.best, hi: iv.best, loAtEdge: false, hiAtEdge: false, unresolved: true });
    input.fit.poorFitP = 0.1;
    const f = await writeReport(input, join(scratch(), 'r'));
    const tex = readFileSync(f.tables.latex, 'utf8');
    const rows = tex.slice(tex.indexOf('\\startdata'), tex.indexOf('\\enddata')).trim().split('\n').slice(1);
    expect(rows[0].split(' & ')[2]).toMatch(/\\tablenotemark\{c\}$/);
    // p-values of the fixture: exp(-chi2/2) = 0.20, 0.11, 0.075, 0.040: the last two are poor at p < 0.1.
    expect(rows.map((r) => r.includes('\\tablenotemark{b}'))).toEqual([false, false, true, true]);
    expect(tex).toContain('\\tablenotetext{b}{Poor fit: $p < 0.1$.}');
    const html = readFileSync(f.html, 'utf8');
    expect(html).toContain('(narrower than the grid step)');
    const summary = html.slice(html.indexOf('<section id="summary">'), html.indexOf('</section>', html.indexOf('<section id="summary">')));
    expect(summary.match(/<td class="poor">/g)).toHaveLength(2);
    expect(csvParse(readFileSync(f.tables.csv, 'utf8'))[0].density_unresolved).toBe('true');
  });

  it('lists joint fits in the HTML, escaped', async () => {
    const f = await writeReport(syntheticInput({ joint: true, config: { formats: ['svg'], figures: ['fit_vs_av'] } }), join(scratch(), 'r'));
    const html = readFileSync(f.html, 'utf8');
    expect(html).toContain('<h2>Joint fits</h2>');
    expect(html).toContain('<th scope="row">&lt;b&gt;core&lt;/b&gt;</th>');
    expect(html).toContain('the group &amp; its &lt;members&gt; share one age');
    expect(html).toContain('1.0×10<sup>5</sup> <span class="range">(3.0×10<sup>4</sup>–3.0×10<sup>5</sup>)</span>');
  });

  it('escapes hostile names in the HTML and inlines the browser bundles', () => {
    const html = readFileSync(files.html, 'utf8');
    expect(html).toContain('<th scope="row">&lt;script&gt;alert(1)&lt;/script&gt;</th>');
    expect(html).toContain('<th scope="row">50%_&amp;_#1</th>');
    // The only <script elements are ours: three bundles, the figure data and the main script.
    expect(html.match(/<script/gi)).toHaveLength(5);
    expect(html).not.toMatch(/src="http|href="http/);
    expect(html).toContain("default-src 'none'");
  });
});

describe('writeReport on a map', () => {
  it('writes FITS images with the WCS of the observed maps (astropy reads them)', async (t) => {
    const dir = scratch();
    const files = await writeReport(syntheticInput({ map: { nx: 6, ny: 5 }, config: { formats: ['svg'] } }), join(dir, 'report'));
    expect(files.maps.map((m) => m.split('/').pop())).toEqual(['best_age_yr.fits', 'best_density.fits', 'best_chi2.fits', 'density_width_dex.fits', 'age_width_dex.fits']);
    expect(files.figures.map((f) => f.name)).toEqual(['sky_map_best_age_yr', 'sky_map_best_density', 'sky_map_best_chi2', 'fit_vs_av']);
    needReference(t, ASTROPY);
    const script = String.raw`
import json, sys, math
from astropy.io import fits
from astropy.wcs import WCS
import astropy.units as u
out = {}
for f in sys.argv[1:]:
    with fits.open(f) as h:
        h.verify('exception')
        d = h[0].data
        hd = h[0].header
        w = WCS(hd)
        out[f.split('/')[-1]] = {'shape': list(d.shape), 'bunit': hd.get('BUNIT'), 'dimensionless': 'BUNIT' in hd and u.Unit(hd['BUNIT']) == u.dimensionless_unscaled, 'object': hd.get('OBJECT'), 'ctype': [hd['CTYPE1'], hd['CTYPE2']],
            'crpix': [hd['CRPIX1'], hd['CRPIX2']], 'world': [float(v) for v in w.pixel_to_world_values(3.5, 2.5)],
            'corner': None if math.isnan(d[4, 0]) else float(d[4, 0]), 'x5y0': float(d[0, 5])}
print(json.dumps(out))
`;
    const r = spawnSync(PYTHON, ['-c', script, ...files.maps], { encoding: 'utf8' });
    expect(r.stderr).toBe('');
    const got = JSON.parse(r.stdout);
    const density = got['best_density.fits'];
    expect(density.shape).toEqual([5, 6]);
    expect(density.bunit).toBe('cm-3');
    expect(density.ctype).toEqual(['RA---TAN', 'DEC--TAN']);
    expect(density.crpix).toEqual([4.5, 3.5]);
    // At the reference pixel (FITS 1-based 4.5, 3.5 = 0-based 3.5, 2.5) the world coordinates are CRVAL (FITS WCS Paper I).
    expect(density.world[0]).toBeCloseTo(83.8, 10);
    expect(density.world[1]).toBeCloseTo(-5.4, 10);
    // The pixel without a fit (x 0, y 4) is NaN; pixel (5, 0) holds 10^(3 + 3 * 5 / 5) = 1e6.
    expect(density.corner).toBeNull();
    expect(density.x5y0).toBeCloseTo(1e6, 6);
    // A header value with markup characters is carried as written: in FITS it is plain text.
    expect(got['best_age_yr.fits'].object).toBe('Frostmere <map> & "50%"');
    expect(got['best_age_yr.fits'].bunit).toBe('yr');
    // Dimensionless images carry BUNIT too, empty: astropy reads it as dimensionless.
    expect(got['best_chi2.fits'].bunit).toBe('');
    expect(got['best_chi2.fits'].dimensionless).toBe(true);
  });
});

describe('header cards carried to the map outputs', () => {
  it('makes values printable ASCII, drops invalid keywords and structural ones, and says so', () => {
    const warnings: string[] = [];
    const cards = carriedCards({ OBJECT: 'Frøstmere', 'bad key': 1, NAXIS1: 5, BUNIT: 'MJy/sr', CRVAL1: 83.8, EQUINOX: 2000 }, warnings);
    expect(cards).toEqual([
      { key: 'OBJECT', value: 'Fr?stmere' },
      { key: 'CRVAL1', value: 83.8 },
      { key: 'EQUINOX', value: 2000 },
    ]);
    expect(warnings).toHaveLength(2);
    expect(warnings[0]).toMatch(/OBJECT/);
    expect(warnings[1]).toMatch(/bad key/);
  });
});

describe('refusing bad requests', () => {
  it('refuses output names that leave the output folder', () => {
    const root = scratch();
    for (const bad of ['../../x', '/etc/x', 'a/b', '..', '.hidden', 'a\\b', '', 'x\u0000y']) {
      expectUserError(() => outputPath(root, bad), 'not allowed', 'inside the output folder');
    }
    expect(outputPath(root, 'fig2_chi2_map.v1')).toBe(join(root, 'fig2_chi2_map.v1'));
  });

  it('refuses a figure named ../../x with the field named, writing nothing', async () => {
    const dir = scratch();
    const input = syntheticInput({ config: { figures: [{ kind: 'fit_vs_av', name: '../../x' }] } });
    await expectUserErrorAsync(writeReport(input, join(dir, 'report')), "field 'report.figures[0].name'", "'../../x' is not allowed", 'pipelines/frostmere.yaml');
    expect(existsSync(join(dir, 'report'))).toBe(false);
  });

  it('refuses a figure kind that does not exist, listing the kinds', async () => {
    const input = syntheticInput({ config: { figures: ['histogram' as 'tracks'] } });
    await expectUserErrorAsync(writeReport(input, join(scratch(), 'report')), "no figure kind 'histogram'", 'chi2_map', 'sky_map', "report.figures[0].kind");
  });

  it('refuses, at the pipeline file, a figure kind that does not exist with its line', () => {
    const yaml = parseYamlText('report:\n  formats: [svg]\n  figures:\n    - tracks\n    - kind: histogram\n', 'p.yaml');
    const e = expectUserError(() => validate(reportSection, yaml, ['report'], (yaml.data as { report: unknown }).report), 'unknown figure kind', 'chi2_map, tracks, fit_vs_av, profiles, sky_map');
    expect(e.location.line).toBe(5);
  });

  it('refuses a sky map for a table, and sightlines without a fit', async () => {
    await expectUserErrorAsync(writeReport(syntheticInput({ config: { figures: ['sky_map'] } }), join(scratch(), 'r')), "'sky_map' cannot be drawn", 'not a map');
    await expectUserErrorAsync(writeReport(syntheticInput({ config: { figures: [{ kind: 'tracks', sightlines: ['Nowhere-9'] }] } }), join(scratch(), 'r')), "'Nowhere-9' has no fit", 'Frostmere-01');
  });

  it('refuses quantities that were not fitted, and draws only the asked ones', async () => {
    await expectUserErrorAsync(writeReport(syntheticInput({ config: { species: ['HCN'] } }), join(scratch(), 'r')), "'HCN' is not among the fitted quantities", 'CO(s)/H2O(s)', "field 'report.species'");
    const files = await writeReport(syntheticInput({ config: { formats: ['svg'], figures: [{ kind: 'tracks', name: 'co', sightlines: ['Frostmere-01'], species: ['CO(s)', 'X(CO)'] }] } }), join(scratch(), 'r'));
    const spec = JSON.parse(readFileSync(files.figures[0].spec, 'utf8'));
    const labels = new Set(JSON.stringify(spec).match(/"quantity":"[^"]+"/g));
    expect([...labels].sort()).toEqual(['"quantity":"CO(s)/H2O(s)"', '"quantity":"X(CO)"']);
  });

  it('refuses two figures of one name', async () => {
    const input = syntheticInput({ config: { figures: [{ kind: 'fit_vs_av', name: 'fig1' }, { kind: 'tracks', name: 'fig1', sightlines: [HOSTILE_NAMES[0]] }] } });
    await expectUserErrorAsync(writeReport(input, join(scratch(), 'r')), "'fig1' is used twice");
  });

  it('says so when a survey has more sightlines than get figures by default', async () => {
    const files = await writeReport(syntheticInput({ config: { formats: ['svg'], max_sightline_figures: 1, figures: ['profiles', 'chi2_map'] } }), join(scratch(), 'r'));
    expect(files.figures.map((f) => f.name)).toEqual(['profiles_01_Frostmere-01', 'chi2_map_01_Frostmere-01']);
    expect(files.warnings).toEqual(['per-sightline figures are drawn for the first 1 of 4 sightlines; list the ones you want in report.sightlines or raise report.max_sightline_figures.']);
  });

  it('keeps a given name for a one-sightline figure', async () => {
    const files = await writeReport(syntheticInput({ config: { formats: ['svg'], figures: [{ kind: 'chi2_map', name: 'fig3', sightlines: ['Frostmere-01'] }] } }), join(scratch(), 'r'));
    expect(files.figures.map((f) => f.name)).toEqual(['fig3']);
  });
});

describe('numbers and thresholds', () => {
  it('prints numbers for LaTeX with two significant figures', () => {
    expect(numberLatex(31622.7)).toBe('3.2\\times10^{4}');
    expect(numberLatex(0.045)).toBe('0.045');
    expect(numberLatex(9.96e-5)).toBe('1.0\\times10^{-4}');
    expect(numberLatex(1000)).toBe('1.0\\times10^{3}');
    expect(numberLatex(12)).toBe('12');
    expect(numberLatex(Number.NaN)).toBe('\\nodata');
    expect(numberLatex(120)).toBe('120');
    expect(numberLatex(0.5)).toBe('0.50');
    expect(numberHtml(3.2e-5)).toBe('3.2×10<sup>−5</sup>');
    expect(numberText(2.5e5)).toBe('2.5×10⁵');
  });
});

describe('chi-square and p-values in tables', () => {
  it('keeps the digits of chi^2 that a dof of 2 needs', () => {
    expect(chi2DofText(1.0025, 2)).toBe('1.00/2');
    expect(chi2DofText(23.456, 7)).toBe('23.5/7');
    expect(chi2DofText(1234.5, 9)).toBe('1235/9');
  });

  it('never rounds a p-value to 0 or 1', () => {
    expect(pValueText(0.9966)).toBe('0.997');
    expect(pValueText(0.99996)).toBe('> 0.9999');
    expect(pValueText(0.5)).toBe('0.50');
    expect(pValueText(0.034)).toBe('0.034');
    expect(pValueText(1.2e-12)).toBe('1.2×10⁻¹²');
    expect(pValueText(1.2e-12, 'latex')).toBe('1.2\\times10^{-12}');
    expect(pValueText(0.99996, 'html')).toBe('&gt; 0.9999');
  });

  it('defines only the table notes a row uses, and lists joint fits in the LaTeX table', async () => {
    const input = syntheticInput({ joint: true, config: { formats: ['svg'], figures: ['fit_vs_av'] } });
    input.fit.poorFitP = 1e-6;
    for (const f of input.fit.fits) for (const iv of f.intervals) Object.assign(iv, { unresolved: false });
    const files = await writeReport(input, join(scratch(), 'r'));
    const tex = readFileSync(files.tables.latex, 'utf8');
    for (const mark of ['a', 'b', 'c']) {
      expect(tex.includes(`\\tablenotetext{${mark}}`), mark).toBe(tex.includes(`\\tablenotemark{${mark}}`));
    }
    expect(tex).not.toContain('\\tablenotetext{b}');
    const body = tex.slice(tex.indexOf('\\startdata'), tex.indexOf('\\enddata'));
    expect(body).toContain('\\cutinhead{Joint fits');
    const joint = input.fit.joint[0];
    const row = body.split('\n').find((l) => l.startsWith('\\textless{}b\\textgreater{}core'))!;
    expect(row).toBeDefined();
    // Shared age with its interval; density and temperature are fitted per member: no single value.
    expect(row).toContain(`$${numberLatex(joint.sharedBest.age_yr)}$ ($${numberLatex(3e4)}$--$${numberLatex(3e5)}$)`);
    expect(row.match(/\\nodata/g)).toHaveLength(3);
    expect(row).toContain(chi2DofText(joint.chi2, joint.dof));
    const html = readFileSync(files.html, 'utf8');
    // Held parameters by their names, with units.
    expect(html).toContain('Held fixed: Cosmic-ray ionisation rate 1.3×10⁻¹⁷ s⁻¹.');
    expect(html).not.toContain('cr_ionisation_rate =');
  });
});

describe('chi^2 by quantity in the HTML', () => {
  it("marks the quantity with the largest share of each sightline's chi^2, and the shares sum to the fit's chi^2", async () => {
    const input = syntheticInput({ config: { formats: ['svg'], figures: ['residuals'] } });
    const files = await writeReport(input, join(scratch(), 'r'));
    const html = readFileSync(files.html, 'utf8');
    const section = html.slice(html.indexOf('<section id="chi2-shares">'), html.indexOf('</section>', html.indexOf('<section id="chi2-shares">')));
    expect(section).toContain('What drives each fit');
    const rows = [...section.matchAll(/<tr><th scope="row">([^<]*)<\/th>(.*?)<\/tr>/g)].filter((m) => m[1] !== 'All sightlines');
    expect(rows).toHaveLength(input.fit.fits.length);
    rows.forEach((m, i) => {
      const fit = input.fit.fits[i];
      const cells = [...m[2].matchAll(/<td([^>]*)>([^<]*)<\/td>/g)].slice(0, fit.residuals.length);
      const top = fit.residuals.reduce((a, r) => (r.chi2 > a.chi2 ? r : a));
      const bold = cells.findIndex((c) => c[1].includes('drives'));
      expect(fit.residuals[bold].label).toBe(top.label);
      const sum = cells.reduce((a, c) => a + Number(c[2].replace(/[▼▲ ]/g, '')), 0);
      expect(sum).toBeCloseTo(fit.residuals.reduce((a, r) => a + r.chi2, 0), 1);
    });
  });
});

describe('subscripts in HTML captions', () => {
  it('writes n_H and A_V with <sub> and leaves other underscores alone', async () => {
    const { subscripts } = await import('../../src/report/html.ts');
    expect(subscripts('best fit n_H = 3 cm⁻³, model A_V = 5 mag')).toBe('best fit n<sub>H</sub> = 3 cm⁻³, model A<sub>V</sub> = 5 mag');
    expect(subscripts('50%_&amp;_#1 and T_Tauri')).toBe('50%_&amp;_#1 and T_Tauri');
  });
});
