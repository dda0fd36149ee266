/**
 * The self-contained HTML report: one file that works offline. The vega,
 * vega-lite and vega-embed browser bundles are inlined from node_modules
 * (no CDN), every figure is embedded as its Vega-Lite spec and drawn
 * interactively, and a Content-Security-Policy allows no network access and
 * only the page's own scripts (by their SHA-256 hashes), so text from user
 * files, which is escaped everywhere, could not run even if it were not.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import type { TopLevelSpec } from 'vega-lite';
import { intervalReading } from '../fit/regions.ts';
import { escapeHtml, inlineScriptSource, jsonForScript } from './escape.ts';
import { chi2DofText, numberHtml, pValueText } from './numbers.ts';
import { mapSummaryHtml, type MapSummary } from './map-tables.ts';
import type { BuiltFigure } from './figures/builder.ts';
import { FIGURE_BUILDERS } from './figures/index.ts';
import type { ParameterCell, SummaryTable } from './tables.ts';
import type { JointFit } from '../fit/types.ts';
import type { ReportInput, ReportProvenance } from './types.ts';
import { parameterTitle, parameterValueText } from './figures/axes.ts';

const require = createRequire(import.meta.url);

/** The UMD bundles that set the globals vega, vegaLite and vegaEmbed (figures-notes.md). */
function bundle(pkg: 'vega' | 'vega-lite' | 'vega-embed', file: string): string {
  // The packages' `exports` hide package.json: find the build folder from the main entry.
  let dir = dirname(require.resolve(pkg));
  while (!dir.endsWith('build') && dirname(dir) !== dir) dir = dirname(dir);
  return readFileSync(join(dir, file), 'utf8');
}

let bundles: string[] | undefined;
function browserBundles(): string[] {
  bundles ??= [bundle('vega', 'vega.min.js'), bundle('vega-lite', 'vega-lite.min.js'), bundle('vega-embed', 'vega-embed.min.js')].map(inlineScriptSource);
  return bundles;
}

export interface HtmlFigure {
  figure: BuiltFigure;
  /** Links to the rendered files, relative to the report folder. */
  links: { label: string; href: string }[];
}

export interface HtmlInput {
  input: ReportInput;
  table: SummaryTable;
  /** A map's summary over its fitted pixels (a map has no sightline rows). */
  mapSummary?: MapSummary;
  figures: HtmlFigure[];
  warnings: string[];
  cautions: readonly string[];
  tableLinks: { label: string; href: string }[];
}

function intervalCell(c: ParameterCell): string {
  const edge = c.loAtEdge || c.hiAtEdge ? ' <span class="edge" title="the interval reaches the edge of the model grid">‡</span>' : '';
  const range =
    c.lo === null || c.hi === null
      ? ''
      : c.unresolved
        ? ' <span class="range" title="only the best grid value lies inside the interval">(narrower than the grid step)</span>'
        : ` <span class="range">(${numberHtml(c.lo)}–${numberHtml(c.hi)})</span>`;
  const disjoint = c.disjoint ? ' <span class="edge" title="the region has several disjoint parts: values between the bounds lie outside it">§</span>' : '';
  return `<td>${numberHtml(c.best)}${range}${edge}${disjoint}</td>`;
}

function summaryHtml(table: SummaryTable): string {
  const heads = ['Sightline', 'A<sub>V</sub> (mag)', ...table.parameters.map((p) => escapeHtml(parameterTitle(p))), 'χ²/dof', 'p', '<span title="observed quantities the best fit matches within a factor of 10 (limits: satisfied); not a test of the fit">Within ×10</span>'];
  const rows = table.rows.map((r) => {
    // Warnings take a full-width row under their sightline: in a column they would stretch every row.
    const warn = r.warnings.length === 0 ? '' : `<tr class="warn-row"><td colspan="${heads.length}"><ul>${r.warnings.map((w) => `<li>${escapeHtml(w)}</li>`).join('')}</ul></td></tr>`;
    return [
      '<tr>',
      `<th scope="row">${escapeHtml(r.sightline)}</th>`,
      `<td>${r.av === null ? '–' : escapeHtml(String(Number(r.av.toPrecision(3))))}</td>`,
      ...r.parameters.map(intervalCell),
      `<td>${escapeHtml(chi2DofText(r.chi2, r.dof))}</td>`,
      `<td${r.pValue < table.poorFitP ? ' class="poor"' : ''}>${pValueText(r.pValue, 'html')}</td>`,
      `<td class="matched">${Math.round(r.agreement * r.used)} of ${r.used}</td>`,
      '</tr>',
      warn,
    ].join('');
  });
  return `<table class="summary"><thead><tr>${heads.map((h) => `<th scope="col">${h}</th>`).join('')}</tr></thead><tbody>\n${rows.join('\n')}\n</tbody></table>`;
}

/**
 * Each quantity's share of chi^2 at every sightline's best fit, with the
 * total: the quantity that contributes most to a row is marked, so the reader
 * sees what drives a poor fit without opening residuals.csv.
 */
function chi2SharesHtml(input: HtmlInput['input']): string {
  const fits = input.fit.fits.filter((f) => f.residuals.length > 0);
  const quantities = [...new Set(fits.flatMap((f) => f.residuals.map((r) => r.label)))];
  const share = (x: number) => (x < 0.005 ? '0.00' : x < 10 ? x.toFixed(2) : x < 100 ? x.toFixed(1) : x.toFixed(0));
  const rows = fits.map((f) => {
    const by = new Map(f.residuals.map((r) => [r.label, r] as const));
    const top = f.residuals.reduce((a, r) => (r.chi2 > a.chi2 ? r : a), f.residuals[0]);
    const cells = quantities.map((q) => {
      const r = by.get(q);
      if (!r) return '<td>–</td>';
      const mark = r.kind === 'upper' ? ' ▼' : r.kind === 'lower' ? ' ▲' : '';
      return `<td${r === top && r.chi2 > 0 ? ' class="drives" title="the largest share of this fit\'s χ²"' : ''}>${share(r.chi2)}${mark}</td>`;
    });
    return `<tr><th scope="row">${escapeHtml(f.sightline)}</th>${cells.join('')}<td>${share(f.best.chi2)}</td><td${f.pValue < input.fit.poorFitP ? ' class="poor"' : ''}>${pValueText(f.pValue, 'html')}</td></tr>`;
  });
  const totals = quantities.map((q) => share(fits.reduce((a, f) => a + (f.residuals.find((r) => r.label === q)?.chi2 ?? 0), 0)));
  const heads = ["Sightline", ...quantities.map((q) => escapeHtml(q).replace(/\//g, "/<wbr>")), "χ²", "p"];
  return `<table class="summary shares"><thead><tr>${heads.map((h) => `<th scope="col">${h}</th>`).join('')}</tr></thead><tbody>\n${rows.join('\n')}\n</tbody><tfoot><tr><th scope="row">All sightlines</th>${totals.map((t) => `<td>${t}</td>`).join('')}<td>${share(fits.reduce((a, f) => a + f.best.chi2, 0))}</td><td></td></tr></tfoot></table>`;
}

/** Groups of sightlines fitted as one with shared parameters. */
function jointHtml(joint: readonly JointFit[], level: number): string {
  const rows = joint.map((j) => {
    const shared = j.shared
      .map((p) => {
        const iv = j.intervals.find((i) => i.parameter === p && Math.abs(i.level - level) < 1e-9);
        const edge = iv && (iv.loAtEdge || iv.hiAtEdge) ? ' <span class="edge" title="the interval reaches the edge of the model grid">‡</span>' : '';
        const range = iv ? ` <span class="range">(${numberHtml(iv.lo)}–${numberHtml(iv.hi)})</span>` : '';
        return `${escapeHtml(parameterTitle(p))}: ${numberHtml(j.sharedBest[p] ?? null)}${range}${edge}`;
      })
      .join('<br>');
    const warn = j.warnings.length === 0 ? '' : `<ul>${j.warnings.map((w) => `<li>${escapeHtml(w)}</li>`).join('')}</ul>`;
    return `<tr><th scope="row">${escapeHtml(j.name)}</th><td>${j.members.map(escapeHtml).join(', ')}</td><td>${shared}</td><td>${escapeHtml(chi2DofText(j.chi2, j.dof))}</td><td>${pValueText(j.pValue, 'html')}</td><td class="warnings">${warn}</td></tr>`;
  });
  return `<table class="summary"><thead><tr><th scope="col">Group</th><th scope="col">Sightlines</th><th scope="col">Shared best values</th><th scope="col">χ²/dof</th><th scope="col">p</th><th scope="col">Warnings</th></tr></thead><tbody>\n${rows.join('\n')}\n</tbody></table>`;
}

function provenanceHtml(p: ReportProvenance): string {
  const rows: [string, string][] = [
    ['hoarfrost version', p.toolVersion],
    ['Node.js', p.nodeVersion],
    ['Command line', p.commandLine.map(shellWord).join(' ')],
  ];
  if (p.pipelineFile) rows.push(['Pipeline file', p.pipelineFile]);
  for (const [k, v] of Object.entries(p.hashes)) rows.push([`${k} hash`, v]);
  for (const [k, v] of Object.entries(p.extra ?? {})) rows.push([k, v]);
  return `<table class="provenance"><tbody>${rows.map(([k, v]) => `<tr><th scope="row">${escapeHtml(k)}</th><td><code>${escapeHtml(v)}</code></td></tr>`).join('')}</tbody></table>`;
}

/** A command-line word as a POSIX shell would need it quoted. */
function shellWord(w: string): string {
  return /^[A-Za-z0-9_@%+=:,./-]+$/.test(w) ? w : `'${w.replace(/'/g, `'\\''`)}'`;
}

/** Our captions write n_H and A_V as plain text; in HTML they get real subscripts (applied to escaped text, only these two symbols: adds only <sub>). */
export function subscripts(escaped: string): string {
  return escaped.replace(/\b(n|A)_(H|V)\b/g, '$1<sub>$2</sub>');
}

function linksHtml(links: { label: string; href: string }[]): string {
  return links.map((l) => `<a href="${escapeHtml(encodeURI(l.href))}">${escapeHtml(l.label)}</a>`).join(' · ');
}

/** Figures that span both columns of a page: on screen they get the page's width. */
const WIDE_KINDS = new Set<string>(['residuals', 'ice_vs_av']);

const STYLE = `
body { font-family: 'DejaVu Sans', 'Bitstream Vera Sans', Verdana, sans-serif; margin: 2em auto; max-width: 72em; padding: 0 1em; color: #111; line-height: 1.4; }
h1 { font-size: 1.6em; margin-bottom: 0.2em; } h2 { border-bottom: 1px solid #ccc; margin-top: 2em; } h3 { margin-top: 1.5em; }
table { border-collapse: collapse; font-size: 0.85em; } th, td { border-bottom: 1px solid #ddd; padding: 0.3em 0.6em; text-align: left; vertical-align: top; }
table.summary td { white-space: nowrap; } table.summary td.warnings, tr.warn-row td { white-space: normal; font-size: 0.85em; color: #7a4a00; }
tr.warn-row td { border-bottom: 1px solid #ccc; padding-top: 0; } table.summary tr:has(+ tr.warn-row) > * { border-bottom: none; }
td.warnings ul, tr.warn-row ul { margin: 0; padding-left: 1.1em; } .range { color: #555; } td.drives { font-weight: bold; } table.shares th[scope=col] { white-space: normal; max-width: 7em; font-weight: normal; overflow-wrap: anywhere; } table.shares tfoot th, table.shares tfoot td { border-top: 1px solid #999; } .edge, .poor { color: #b00020; font-weight: bold; }
.figures { display: flex; flex-wrap: wrap; gap: 1.5em; } figure { margin: 0; max-width: 34em; } figure.wide { max-width: 100%; }
figcaption { font-size: 0.85em; color: #333; } .files { font-size: 0.8em; }
.vis svg text { font-family: 'DejaVu Sans', 'Bitstream Vera Sans', Verdana, sans-serif; }
/* Figures are sized in points for a printed column; on screen they are drawn half as large again. */
.vis > svg { height: auto; max-width: 100%; }
.cautions li { margin-bottom: 0.5em; } code { font-size: 0.9em; word-break: break-all; }
#embed-error { color: #b00020; font-weight: bold; }
.scroll { overflow-x: auto; }
`;

const MAIN_SCRIPT = `
(function () {
  var SCREEN_SCALE = 1.5;
  var figures = JSON.parse(document.getElementById('hoarfrost-figures').textContent);
  var jobs = figures.map(function (f) {
    return vegaEmbed('#' + f.id, f.spec, { actions: false, renderer: 'svg' }).then(function (result) {
      var svg = result.view.container().querySelector('svg');
      if (svg) svg.style.width = (SCREEN_SCALE * Number(svg.getAttribute('width'))) + 'px';
      return result;
    });
  });
  Promise.all(jobs).then(function () {
    document.body.setAttribute('data-ready', 'true');
    window.hoarfrostReportReady = true;
  }, function (error) {
    var p = document.getElementById('embed-error');
    p.textContent = 'A figure could not be drawn: ' + error;
    p.hidden = false;
    document.body.setAttribute('data-ready', 'error');
    console.error(error);
  });
})();
`;

function scriptHash(source: string): string {
  return `'sha256-${createHash('sha256').update(source, 'utf8').digest('base64')}'`;
}

export function reportHtml(h: HtmlInput): string {
  const { input } = h;
  const title = input.config.title ?? input.title;
  const specs = h.figures.map((f, i) => ({ id: `vis-${i}`, spec: f.figure.spec as TopLevelSpec }));
  const specScript = jsonForScript(specs);
  const scripts = [...browserBundles(), MAIN_SCRIPT];
  // Our own text (no user data): single quotes are safe inside the double-quoted attribute.
  const csp = [
    "default-src 'none'",
    `script-src ${scripts.map(scriptHash).join(' ')} 'unsafe-eval'`,
    "style-src 'unsafe-inline'",
    'img-src data:',
  ].join('; ');
  const byKind = new Map<string, { f: HtmlFigure; i: number }[]>();
  h.figures.forEach((f, i) => {
    const list = byKind.get(f.figure.kind) ?? [];
    list.push({ f, i });
    byKind.set(f.figure.kind, list);
  });
  const figureSections = [...byKind.entries()].map(([kind, list]) => {
    const heading = FIGURE_BUILDERS[kind as keyof typeof FIGURE_BUILDERS].description;
    const items = list.map(
      ({ f, i }) =>
        `<figure id="figure-${i}"${WIDE_KINDS.has(f.figure.kind) ? ' class="wide"' : ''}><div class="vis" id="vis-${i}"></div><figcaption><strong>${subscripts(escapeHtml(f.figure.title))}.</strong> ${subscripts(escapeHtml(f.figure.caption))}</figcaption><p class="files">${linksHtml(f.links)}</p></figure>`,
    );
    return `<h3>${subscripts(escapeHtml(heading.replace(/^[a-z]/, (c) => c.toUpperCase())))}</h3>\n<div class="figures">\n${items.join('\n')}\n</div>`;
  });
  // The fit stage gathers every warning, the rows' too: the rows show theirs, this list the rest, each once.
  const inRows = new Set([...input.fit.fits.flatMap((f) => f.warnings), ...input.fit.joint.flatMap((j) => j.warnings)]);
  const allWarnings = [...new Set([...input.observations.warnings, ...input.fit.warnings, ...h.warnings])].filter((w) => !inRows.has(w));
  const fixed = Object.entries(input.fit.fixedParameters);
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${csp}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)}</title>
<style>${STYLE}</style>
</head>
<body data-ready="false">
<header>
<h1>${escapeHtml(title)}</h1>
<p>${input.map && h.table.rows.length === 0 ? `${input.map.fittedPixels} of ${input.map.nx * input.map.ny} map pixels` : `${h.table.rows.length} sightline${h.table.rows.length === 1 ? '' : 's'}`} fitted against ${input.fit.interpolation ? `${input.fit.interpolation.gridCandidates} model candidates (every model at every output time), interpolated onto a mesh ${input.fit.interpolation.factor} times finer (${input.fit.interpolation.refinedCandidates} candidates)` : `${input.fit.nCandidates} model candidates (every model at every output time)`}; model-uncertainty floor ${escapeHtml(String(input.fit.modelSigmaDex))} dex. Intervals: ${escapeHtml(String(Number((h.table.level * 100).toFixed(1))))}% confidence, Δχ² ≤ ${escapeHtml(h.table.deltaChi2.toFixed(2))} (${escapeHtml(intervalReading(h.table.parametersOfInterest))}).${fixed.length > 0 ? ` Held fixed: ${fixed.map(([k, v]) => escapeHtml(parameterValueText(k, v))).join('; ')}.` : ''}</p>
<p class="files">Tables and images: ${linksHtml(h.tableLinks)}</p>
<p id="embed-error" hidden></p>
</header>
<section id="summary">
<h2>Best fits</h2>
${h.table.rows.length > 0 ? `<div class="scroll">${summaryHtml(h.table)}</div>` : h.mapSummary ? `<div class="scroll">${mapSummaryHtml(h.mapSummary)}</div>\n<p class="files">One row per fitted pixel: the CSV table; every image: the FITS files linked above.</p>` : '<p>No fitted sightline.</p>'}
${h.table.rows.length > 0 ? '<p class="files">‡ the interval reaches the edge of the model grid; § the region has disjoint parts. Within ×10: how many of the observed quantities the best fit matches within a factor of 10 (limits: satisfied); a count for orientation, not a test: the p-value beside it is the test of the fit.</p>' : ''}
</section>
${input.fit.fits.some((f) => f.residuals.length > 0) ? `<section id="chi2-shares">\n<h2>What drives each fit: χ² by quantity</h2>\n<div class="scroll">${chi2SharesHtml(input)}</div>\n<p class="files">Each observed quantity's share of χ² at the sightline's best fit (▼ upper, ▲ lower limit); the largest share of each row is in bold. The residuals figure below shows the same by colour, with the residuals in dex.</p>\n</section>` : ''}
${input.fit.joint.length > 0 ? `<section id="joint">\n<h2>Joint fits</h2>\n<div class="scroll">${jointHtml(input.fit.joint, h.table.level)}</div>\n</section>` : ''}
<section id="cautions">
<h2>Read these results with care</h2>
<ul class="cautions">${h.cautions.map((c) => `<li>${escapeHtml(c)}</li>`).join('')}</ul>
</section>
${allWarnings.length > 0 ? `<section id="warnings">\n<h2>Warnings</h2>\n<ul>${allWarnings.map((w) => `<li>${escapeHtml(w)}</li>`).join('')}</ul>\n</section>` : ''}
<section id="figures">
<h2>Figures</h2>
${figureSections.join('\n') || '<p>No figures.</p>'}
</section>
<section id="provenance">
<h2>Provenance</h2>
${provenanceHtml(input.provenance)}
</section>
${scripts.slice(0, 3).map((s) => `<script>${s}</script>`).join('\n')}
<script type="application/json" id="hoarfrost-figures">${specScript}</script>
<script>${MAIN_SCRIPT}</script>
</body>
</html>
`;
}
