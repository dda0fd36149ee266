/**
 * Figure builders: every spec validates against the Vega-Lite JSON schema
 * shipped in the vega-lite package (build/vega-lite-schema.json, the
 * published schema of the version we pin), renders to SVG in Node with its
 * axis titles present, and vega-lite and vega raise no warning over it.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { Ajv, type ValidateFunction } from 'ajv';
import { XMLValidator } from 'fast-xml-parser';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildFigures } from '../../src/report/figures/index.ts';
import { logAxis } from '../../src/report/figures/axes.ts';
import type { BuiltFigure } from '../../src/report/figures/builder.ts';
import * as vega from 'vega';
import { blockSize, pixelColours } from '../../src/report/raster.ts';
import { renderSvg, svgToPdf, svgToPng, solidDashesRemoved } from '../../src/report/render.ts';
import { HOSTILE_NAMES, syntheticInput } from './fixture.ts';

const require = createRequire(import.meta.url);
const schemaFile = join(dirname(require.resolve('vega-lite')), 'vega-lite-schema.json');

/** Axis titles each kind must show (units as design.md fixes them). */
const EXPECTED_TITLES: Record<string, string[]> = {
  chi2_map: ['Density (cm⁻³)', 'Chemical age (yr)', 'Δχ²'],
  tracks: ['Chemical age (yr)', 'Ratio to H2O(s)', 'X relative to H'],
  fit_vs_av: ['Visual extinction (mag)', 'Density (cm⁻³)', 'Chemical age (yr)'],
  profiles: ['Density (cm⁻³)', 'Chemical age (yr)', 'Gas temperature (K)', 'Δχ²'],
  sky_map: ['Right ascension (deg)', 'Declination (deg)'],
  residuals: ['Sightline', 'Quantity', 'Residual (σ)'],
  ice_vs_av: ['Visual extinction (mag)', 'Ratio to H2O(s)'],
  sky_positions: ['Right ascension (deg)', 'Declination (deg)'],
  parameters: ['Density (cm⁻³)', 'Chemical age (yr)', 'Gas temperature (K)', 'Sightline (in order of visual extinction)'],
};
/** Figures of survey-wide kinds span both columns of a page (7.1 in = 511 pt, with room for legends); the rest one column. */
const FULL_WIDTH_KINDS = new Set(['residuals', 'ice_vs_av']);

/** Text content of an SVG's <text> elements, entities decoded. */
function svgTexts(svg: string): string[] {
  return [...svg.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((m) =>
    m[1].replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;|&apos;/g, "'").replace(/&amp;/g, '&'),
  );
}

describe('default figure kinds', () => {
  it('a survey without sky positions draws no sky figure and does not warn that it is missing', () => {
    const input = syntheticInput();
    const unplaced = { ...input, observations: { ...input.observations, sightlines: input.observations.sightlines.map(({ ra: _ra, dec: _dec, ...s }) => s) } };
    const warnings: string[] = [];
    const figs = buildFigures(unplaced, warnings);
    expect(figs.some((f) => f.kind === 'sky_positions')).toBe(false);
    expect(warnings).toEqual([]);
    // With positions the same input draws it.
    expect(buildFigures(input, []).some((f) => f.kind === 'sky_positions')).toBe(true);
  });
});

describe('figure builders', () => {
  let figures: BuiltFigure[];
  let validate: ValidateFunction;
  beforeAll(() => {
    const warnings: string[] = [];
    figures = [...buildFigures(syntheticInput(), warnings), ...buildFigures(syntheticInput({ map: { nx: 6, ny: 5 }, config: { sightlines: ['Frostmere-01'] } }), warnings)];
    expect(warnings).toEqual([]);
    // The schema's uri formats are not what is checked here; without ajv-formats they are skipped quietly.
    const ajv = new Ajv({ strict: false, allErrors: false, validateFormats: false });
    validate = ajv.compile(JSON.parse(readFileSync(schemaFile, 'utf8')));
  });

  it('draws every kind for a table and a map', () => {
    const kinds = new Set(figures.map((f) => f.kind));
    expect([...kinds].sort()).toEqual(['chi2_map', 'fit_vs_av', 'ice_vs_av', 'parameters', 'profiles', 'residuals', 'sky_map', 'sky_positions', 'tracks']);
    // Per-sightline kinds: one figure per sightline of the table (4) plus the one chosen map pixel.
    expect(figures.filter((f) => f.kind === 'chi2_map')).toHaveLength(5);
    expect(figures.filter((f) => f.kind === 'sky_map').map((f) => f.name)).toEqual(['sky_map_best_age_yr', 'sky_map_best_density', 'sky_map_best_chi2']);
  });

  it('gives every figure a safe, unique file name even for hostile sightline names', () => {
    const names = figures.map((f) => f.name);
    for (const n of names) expect(n).toMatch(/^[A-Za-z0-9_-][A-Za-z0-9._-]*$/);
    expect(new Set(names.slice(0, 19)).size).toBe(19);
  });

  it('validates every spec against the Vega-Lite JSON schema', () => {
    for (const f of figures) {
      const ok = validate(f.spec);
      expect(ok, `${f.name}: ${JSON.stringify(validate.errors?.slice(0, 3))}`).toBe(true);
    }
  });

  it('rejects a spec with a misspelt mark (the schema check can fail)', () => {
    const bad = { ...figures[0].spec, layer: undefined, mark: 'rectangle', encoding: {} };
    expect(validate(bad)).toBe(false);
  });

  it('renders each kind to well-formed SVG with its axis titles and no vega warning', async () => {
    const seen = new Set<string>();
    for (const f of figures) {
      if (seen.has(f.kind) && f.kind !== 'tracks') continue;
      seen.add(f.kind);
      const out = await renderSvg(f.spec);
      expect(out.warnings, f.name).toEqual([]);
      expect(XMLValidator.validate(out.svg), f.name).toBe(true);
      const texts = svgTexts(out.svg);
      for (const title of EXPECTED_TITLES[f.kind]) expect(texts, `${f.name} lacks '${title}'`).toContain(title);
      // A figure for one printed column: 3.4 in = 245 pt, with a little room for legends.
      expect(out.width).toBeGreaterThan(200);
      expect(out.width, f.name).toBeLessThan(FULL_WIDTH_KINDS.has(f.kind) ? 620 : 330);
    }
    expect(seen.size).toBe(9);
  });

  it('puts no title inside a figure file: the title and caption name the sightline and the best fit in words', () => {
    for (const f of figures) {
      expect(JSON.stringify(f.spec), f.name).not.toMatch(/"title":\{"text"/);
      expect('title' in f.spec, f.name).toBe(false);
    }
    const f = figures.find((x) => x.kind === 'tracks' && x.sightline === HOSTILE_NAMES[0])!;
    expect(f.title).toContain(HOSTILE_NAMES[0]);
    expect(f.title).toMatch(/n_H = [0-9.×⁰-⁹]+ cm⁻³, T = 10 K, age [0-9.×⁰-⁹]+ yr/);
    expect(f.title).not.toMatch(/model [a-z0-9]{8}/);
  });

  it('shows a hostile sightline name as text in the SVG, escaped, with no element made of it', async () => {
    const g = figures.find((x) => x.kind === 'residuals')!;
    const out = await renderSvg(g.spec);
    expect(out.svg).not.toContain('<script');
    expect(out.svg).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
    expect(svgTexts(out.svg)).toEqual(expect.arrayContaining(HOSTILE_NAMES));
    expect(XMLValidator.validate(out.svg)).toBe(true);
  });

  it('colours each residual by its sigma and labels it in dex, limits by a triangle', () => {
    const g = figures.find((x) => x.kind === 'residuals')!;
    const rows = (g.spec as { data: { values: { sightline: string; quantity: string; sigma: number; label: string; kind: string }[] } }).data.values;
    const input = syntheticInput();
    const fit = input.fit.fits[0];
    for (const r of fit.residuals) {
      const row = rows.find((x) => x.sightline === fit.sightline && x.quantity === r.label)!;
      expect(Math.abs(row.sigma)).toBeCloseTo(Math.sqrt(r.chi2), 12);
      if (r.kind === 'detection') expect(Number(row.label.replace('−', '-'))).toBeCloseTo(r.residualDex, 1);
      else expect(row.label).toBe(r.kind === 'upper' ? '▼' : '▲');
    }
  });

  it('writes a PNG with text (bundled fonts) and a vector PDF with DejaVu embedded', async () => {
    const f = figures.find((x) => x.kind === 'chi2_map')!;
    const out = await renderSvg(f.spec);
    const png = svgToPng(out.svg, 144);
    // PNG signature (ISO/IEC 15948, section 5.2) and the IHDR size: width at 144 dpi is twice the points.
    expect([...png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(png.readUInt32BE(16)).toBe(Math.round(out.width * 2));
    // Without fonts resvg drops every text silently: the same SVG with its text removed must give a smaller PNG.
    const noText = svgToPng(out.svg.replace(/<text[^>]*>[^<]*<\/text>/g, ''), 144);
    expect(png.length).toBeGreaterThan(noText.length * 1.05);
    const pdf = await svgToPdf(out, f.title);
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const text = pdf.toString('latin1');
    expect(text).toMatch(/\/FontName \/[A-Z]{6}\+DejaVuSans/);
    expect(text).toContain(`/MediaBox [0 0 ${out.width} ${out.height}]`);
  });

  it('draws a map without sightline fits against A_V from the map images, one point per pixel', async () => {
    const input = syntheticInput({ map: { nx: 6, ny: 5 } });
    input.fit.fits = [];
    input.observations.sightlines = Array.from({ length: 30 }, (_, i) => ({ id: `${i % 6},${Math.floor(i / 6)}`, av: 3 + i, pixel: { x: i % 6, y: Math.floor(i / 6) }, columns: {}, source: { file: 'map.fits' } }));
    const warnings: string[] = [];
    const figs = buildFigures(input, warnings);
    expect(figs.map((f) => f.kind)).toEqual(['sky_map', 'sky_map', 'sky_map', 'fit_vs_av']);
    const spec = figs[3].spec as { vconcat: { data: { values: { value: number }[] } }[] };
    // 30 pixels, one without a fit in the images (x 0, y 4).
    expect(spec.vconcat[0].data.values).toHaveLength(29);
    expect(spec.vconcat[0].data.values[5].value).toBeCloseTo(1e6, 6);
    expect(validate(figs[3].spec)).toBe(true);
    expect((await renderSvg(figs[3].spec)).warnings).toEqual([]);
  });

  it('draws a large map as one raster image matching its legend', async () => {
    const input = syntheticInput({ map: { nx: 70, ny: 66 }, config: { figures: ['sky_map'] } });
    const figs = buildFigures(input, []);
    expect(figs).toHaveLength(3);
    for (const f of figs) expect(validate(f.spec), f.name).toBe(true);
    const density = figs.find((f) => f.name === 'sky_map_best_density')!;
    const layers = (density.spec as { layer: { mark: { type: string }; data: { values: { url?: string }[] } }[] }).layer;
    expect(layers.map((l) => l.mark.type)).toEqual(['image', 'point']);
    const url = layers[0].data.values[0].url!;
    const png = Buffer.from(url.replace(/^data:image\/png;base64,/, ''), 'base64');
    // IHDR (ISO/IEC 15948 section 11.2.2): width and height in whole blocks of the map's pixels.
    expect([png.readUInt32BE(16), png.readUInt32BE(20)]).toEqual([70 * blockSize(70), 66 * blockSize(70)]);
    const out = await renderSvg(density.spec);
    expect(out.warnings).toEqual([]);
    expect(out.svg).toContain('<image');
    expect(svgTexts(out.svg)).toEqual(expect.arrayContaining(['Right ascension (deg)', 'Declination (deg)', 'Density (cm⁻³)']));
    // Without the per-pixel rectangles the figure stays small.
    expect(out.svg.length).toBeLessThan(400_000);
  });

  it('colours raster pixels as the vega scale of the legend does', () => {
    const viridis = vega.scheme('viridis') as (t: number) => string;
    const colours = pixelColours([1e3, 1e4, 1e5, null, 0], 'log', [1e3, 1e5], 'viridis');
    expect(colours).toEqual([viridis(0), viridis(0.5), viridis(1), null, null]);
    expect(pixelColours([2, 4, 6], 'linear', [2, 6], 'cividis')[1]).toBe((vega.scheme('cividis') as (t: number) => string)(0.5));
  });

  it('drops only all-gap-zero dash patterns before the PDF', () => {
    expect(solidDashesRemoved('<path stroke-dasharray="1,0" d="M0"/>')).toBe('<path d="M0"/>');
    expect(solidDashesRemoved('<path stroke-dasharray="4,2" d="M0"/>')).toBe('<path stroke-dasharray="4,2" d="M0"/>');
  });
});

describe('sky images in world coordinates', () => {
  it('labels the axes with RA and Dec from the WCS (east to the left), and keeps pixel axes without one', async () => {
    const input = syntheticInput({ map: { nx: 8, ny: 6 }, config: { formats: ['svg'] } });
    const fig = buildFigures(input, []).find((f) => f.name === 'sky_map_best_density')!;
    const texts = svgTexts((await renderSvg(fig.spec)).svg);
    const numbers = texts.map(Number).filter((v) => Number.isFinite(v));
    const ra = numbers.filter((v) => v > 80);
    const dec = numbers.filter((v) => v < 0);
    expect(ra.length).toBeGreaterThanOrEqual(2);
    expect(dec.length).toBeGreaterThanOrEqual(2);
    // Around CRVAL (83.8, -5.4) within the 8 x 6 mrad-sized field.
    for (const v of ra) expect(Math.abs(v - 83.8)).toBeLessThan(0.006);
    for (const v of dec) expect(Math.abs(v + 5.4)).toBeLessThan(0.004);
    // CDELT1 < 0: RA falls from left to right, as on the sky.
    expect(ra[0]).toBeGreaterThan(ra[ra.length - 1]);
    const noWcs = syntheticInput({ map: { nx: 8, ny: 6 }, config: { formats: ['svg'] } });
    noWcs.observations.map = { nx: 8, ny: 6, wcs: {} };
    const plain = buildFigures(noWcs, []).find((f) => f.name === 'sky_map_best_density')!;
    expect(svgTexts((await renderSvg(plain.spec)).svg)).toEqual(expect.arrayContaining(['Pixel x', 'Pixel y']));
  });
});

describe('log axes of less than two decades', () => {
  it('labels columns of 10^17 to 10^18 as 2×10¹⁷, not 2e+17, and keeps plain labels for ratios', () => {
    const axis = logAxis(1.5e17, 7e18);
    expect(axis.values).toEqual([2e17, 5e17, 1e18, 2e18, 5e18]);
    expect(axis.labelExpr).toContain(`"${String(2e17)}":"2×10¹⁷"`);
    expect(axis.labelExpr).toContain(`"${String(1e18)}":"10¹⁸"`);
    expect(logAxis(0.09, 0.7)).toEqual({ format: '~g' });
  });
});
