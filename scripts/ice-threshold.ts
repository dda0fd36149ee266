/**
 * The water-ice threshold of a layered slab (docs/cloud-structure.md section 1):
 * the column N(H2O(s)) through slabs of line-of-sight A_V 1, 2, ... mag,
 * summed from the layer models of a computed layered pipeline's store, at
 * each density of its grid and a few ages; and, per curve, the threshold as
 * observers define it: where a straight line fitted to the column over the
 * upper half of the A_V range meets zero (common practice).
 *
 *   npx tsx scripts/ice-threshold.ts pipelines/examples/demo-layered.yaml [OUTDIR]
 *
 * Writes ice-threshold.csv, .vl.json, .svg and .png into OUTDIR (default
 * <output of the pipeline>/ice-threshold). Run the pipeline's grid first.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { TopLevelSpec } from 'vega-lite';
import { toCsv } from '../src/config/csv.ts';
import { loadPipeline } from '../src/config/pipeline.ts';
import { loadCandidates } from '../src/grid/candidates.ts';
import { layeredColumns } from '../src/grid/expand.ts';
import { layeredCandidates } from '../src/grid/layered-candidates.ts';
import { deepestDepth } from '../src/grid/layers.ts';
import { mainStoreFile } from '../src/grid/plan.ts';
import { renderSvg, svgToPng } from '../src/report/render.ts';

/** Ages shown: every half decade from 1e5 to 3e6 yr (matched to the grid's output times within 0.05 dex). */
const AGES_YR = [1e5, 10 ** 5.5, 1e6, 10 ** 6.5];
const SPECIES = 'H2O(s)';

const file = process.argv[2];
if (!file) throw new Error('usage: npx tsx scripts/ice-threshold.ts PIPELINE [OUTDIR]');
const pipeline = loadPipeline(file);
const columns = layeredColumns(pipeline.config.conditions);
if (!columns) throw new Error(`${file}: visual_extinction does not run through layers`);
const nhPerAv = pipeline.config.observations?.nh_per_av ?? 1.87e21;
const store = mainStoreFile({ storeDir: join(pipeline.resolvePath(pipeline.config.output), 'store') });
const table = loadCandidates(store, [SPECIES]);
const np = table.parameterNames.length;
const avIndex = table.parameterNames.indexOf('visual_extinction');
let deepestCell = 0;
for (let m = 0; m < table.nModels; m++) deepestCell = Math.max(deepestCell, table.parameters[m * np + avIndex]);
const losAvs: number[] = [];
for (let av = columns.step; deepestDepth(columns.geometry, av) <= deepestCell + columns.step / 2 + 1e-9; av += columns.step) losAvs.push(Number(av.toPrecision(12)));
const { table: cols } = layeredCandidates(table, columns, losAvs);

const dIndex = cols.parameterNames.indexOf('density');
const rows: { density: number; age_yr: number; av: number; column: number }[] = [];
for (const age of AGES_YR) {
  const t = cols.timesYr.findIndex((v) => Math.abs(Math.log10(v / age)) < 0.05);
  if (t < 0) continue;
  for (let m = 0; m < cols.nModels; m++) {
    const av = cols.parameters[m * np + avIndex];
    const x = cols.abundances[m * cols.nTimes + t];
    rows.push({ density: cols.parameters[m * np + dIndex], age_yr: cols.timesYr[t], av, column: x * nhPerAv * av });
  }
}

/** The threshold of one curve: the A_V where a straight line through the column's upper half meets zero. */
function threshold(curve: { av: number; column: number }[]): number | null {
  const upper = curve.filter((p) => p.av >= curve[curve.length - 1].av / 2);
  if (upper.length < 2) return null;
  const n = upper.length;
  const mx = upper.reduce((s, p) => s + p.av, 0) / n;
  const my = upper.reduce((s, p) => s + p.column, 0) / n;
  const slope = upper.reduce((s, p) => s + (p.av - mx) * (p.column - my), 0) / upper.reduce((s, p) => s + (p.av - mx) ** 2, 0);
  return slope > 0 ? mx - my / slope : null;
}

const summary: string[] = [];
const groups = new Map<string, typeof rows>();
for (const r of rows) {
  const key = `${r.density} ${r.age_yr}`;
  groups.set(key, [...(groups.get(key) ?? []), r]);
}
for (const [key, curve] of groups) {
  curve.sort((a, b) => a.av - b.av);
  const [density, age] = key.split(' ').map(Number);
  const th = threshold(curve);
  const slope = curve.length > 1 ? (curve[curve.length - 1].column - curve[Math.floor(curve.length / 2)].column) / (curve[curve.length - 1].av - curve[Math.floor(curve.length / 2)].av) : NaN;
  summary.push(`n_H ${density.toExponential(2)} cm^-3, ${age.toExponential(2)} yr: threshold ${th === null || th <= 0 ? 'none (the fitted line meets zero at or below 0 mag)' : `${th.toFixed(2)} mag`}, slope ${slope.toExponential(2)} cm^-2 per mag`);
}

const outDir = process.argv[3] ?? join(pipeline.resolvePath(pipeline.config.output), 'ice-threshold');
mkdirSync(outDir, { recursive: true });
writeFileSync(join(outDir, 'ice-threshold.csv'), toCsv(['density', 'age_yr', 'av_los', 'N_H2O_ice'], rows.map((r) => [r.density, r.age_yr, r.av, r.column])));
const spec: TopLevelSpec = {
  $schema: 'https://vega.github.io/schema/vega-lite/v5.json',
  title: { text: `Water ice through a layered ${columns.geometry.kind} (${pipeline.config.name})`, subtitle: 'dashed: about 3 mag, the threshold of nearby clouds (memory)' },
  data: { values: rows.map((r) => ({ ...r, density: `n_H = ${r.density.toExponential(1)}`, age: `${(r.age_yr / 1e6).toPrecision(2)} Myr` })) },
  facet: { column: { field: 'age', type: 'ordinal', sort: AGES_YR.map((a) => `${(a / 1e6).toPrecision(2)} Myr`), title: 'age' } },
  spec: {
    width: 220,
    height: 200,
    layer: [
      { mark: { type: 'line', point: true }, encoding: { x: { field: 'av', type: 'quantitative', title: 'line-of-sight A_V (mag)' }, y: { field: 'column', type: 'quantitative', title: 'N(H2O ice) (cm^-2)', axis: { format: '.1e' } }, color: { field: 'density', type: 'nominal', title: 'density (cm^-3)', sort: [...new Set(rows.map((r) => r.density))].sort((a, b) => a - b).map((d) => `n_H = ${d.toExponential(1)}`) } } },
      { mark: { type: 'rule', strokeDash: [4, 4], color: 'grey' }, encoding: { x: { datum: 3 } } },
    ],
  },
} as TopLevelSpec;
const rendered = await renderSvg(spec);
writeFileSync(join(outDir, 'ice-threshold.vl.json'), JSON.stringify(spec, null, 1) + '\n');
writeFileSync(join(outDir, 'ice-threshold.svg'), rendered.svg);
writeFileSync(join(outDir, 'ice-threshold.png'), svgToPng(rendered.svg, 150));
process.stdout.write(`${summary.join('\n')}\nwrote ${outDir}/ice-threshold.{csv,vl.json,svg,png}\n`);
