/**
 * The report stage's entry: `writeReport(input, outDir)` draws every figure
 * (Vega-Lite spec, SVG, PNG, PDF side by side), writes the tables (CSV,
 * JSON, LaTeX), the FITS images of a map, and the self-contained HTML report.
 *
 * Layout of outDir:
 *   index.html
 *   figures/NAME.vl.json, NAME.svg, NAME.png, NAME.pdf, NAME.caption.txt (title and caption)
 *   tables/best_fits.csv, best_fits.json, best_fits.tex (a map: one row per fitted pixel; the LaTeX a summary over the pixels)
 *   maps/<image>.fits (maps only)
 */
import { mkdirSync } from 'node:fs';
import { writeOutput } from '../config/write.ts';
import { relative, resolve } from 'node:path';
import { cautionsFor } from './cautions.ts';
import { buildFigures } from './figures/index.ts';
import { reportHtml, type HtmlFigure } from './html.ts';
import { MAP_OUTPUTS, writeMapImages } from './maps.ts';
import { outputPath } from './paths.ts';
import { renderSvg, svgToPdf, svgToPng } from './render.ts';
import { mapPixelsCsv, mapSummary, mapSummaryJson, mapSummaryLatex } from './map-tables.ts';
import { summaryCsv, summaryJson, summaryLatex, summaryTable } from './tables.ts';
import type { FigureFile, FigureFormat, ReportFiles, ReportInput } from './types.ts';

export type { ReportInput, ReportFiles, ModelTrack, ReportProvenance, FigureFile } from './types.ts';
export { buildFigures } from './figures/index.ts';

export const REPORT_FOLDERS = { figures: 'figures', tables: 'tables', maps: 'maps' } as const;
export const REPORT_HTML = 'index.html';

export async function writeReport(input: ReportInput, outDir: string): Promise<ReportFiles> {
  const dir = resolve(outDir);
  const warnings: string[] = [];
  // Every figure is built (and every name checked) before anything is written.
  const figures = buildFigures(input, warnings);
  const figuresDir = outputPath(dir, REPORT_FOLDERS.figures);
  const tablesDir = outputPath(dir, REPORT_FOLDERS.tables);
  mkdirSync(figuresDir, { recursive: true });
  mkdirSync(tablesDir, { recursive: true });
  const written: string[] = [];
  const write = (file: string, data: string | Buffer): string => {
    writeOutput(file, data);
    written.push(file);
    return file;
  };

  const formats = new Set<FigureFormat>(input.config.formats);
  const figureFiles: FigureFile[] = [];
  const htmlFigures: HtmlFigure[] = [];
  for (const fig of figures) {
    const base = (ext: string) => outputPath(figuresDir, `${fig.name}${ext}`);
    const spec = write(base('.vl.json'), `${JSON.stringify(fig.spec, null, 2)}\n`);
    // Journals print captions below the figure, not inside it: the figure files carry no title, the caption sits beside them.
    const caption = write(base('.caption.txt'), `${fig.title}. ${fig.caption}\n`);
    const rendered: FigureFile['rendered'] = {};
    const figFormats = fig.formats ?? [...formats];
    const svg = await renderSvg(fig.spec);
    for (const w of svg.warnings) warnings.push(`figure ${fig.name}: ${w}`);
    if (figFormats.includes('svg')) rendered.svg = write(base('.svg'), svg.svg);
    if (figFormats.includes('png')) rendered.png = write(base('.png'), svgToPng(svg.svg, input.config.png_dpi));
    if (figFormats.includes('pdf')) rendered.pdf = write(base('.pdf'), await svgToPdf(svg, fig.title));
    figureFiles.push({ name: fig.name, kind: fig.kind, title: fig.title, sightline: fig.sightline, spec, caption, rendered });
    const rel = (f: string) => relative(dir, f).split('\\').join('/');
    htmlFigures.push({
      figure: fig,
      links: [
        ...(['svg', 'png', 'pdf'] as const).filter((k) => rendered[k]).map((k) => ({ label: k.toUpperCase(), href: rel(rendered[k] as string) })),
        { label: 'Vega-Lite spec', href: rel(spec) },
      ],
    });
  }

  const table = summaryTable(input);
  // A map has no sightline fits: its tables are one row per fitted pixel and a summary over the pixels.
  const pixels = input.map && table.rows.length === 0 ? mapSummary(input.map, input.observations.sightlines, input.fit.poorFitP, input.observations.map?.wcs) : undefined;
  const tables = {
    csv: write(outputPath(tablesDir, 'best_fits.csv'), pixels ? mapPixelsCsv(pixels) : summaryCsv(table)),
    json: write(outputPath(tablesDir, 'best_fits.json'), pixels ? mapSummaryJson(pixels) : summaryJson(table, input)),
    latex: write(outputPath(tablesDir, 'best_fits.tex'), pixels ? mapSummaryLatex(pixels, input.config.table_caption) : summaryLatex(table, input.config.table_caption, input.fit.joint)),
  };

  let maps: string[] = [];
  if (input.map) {
    const mapsDir = outputPath(dir, REPORT_FOLDERS.maps);
    mkdirSync(mapsDir, { recursive: true });
    maps = writeMapImages(input.map, input.observations.map, warnings, MAP_OUTPUTS, (name) => outputPath(mapsDir, `${name}.fits`));
    written.push(...maps);
  }

  const html = write(
    outputPath(dir, REPORT_HTML),
    reportHtml({
      input,
      table,
      mapSummary: pixels,
      figures: htmlFigures,
      warnings,
      cautions: cautionsFor(input),
      tableLinks: [
        { label: 'CSV', href: `${REPORT_FOLDERS.tables}/best_fits.csv` },
        { label: 'JSON', href: `${REPORT_FOLDERS.tables}/best_fits.json` },
        { label: 'LaTeX', href: `${REPORT_FOLDERS.tables}/best_fits.tex` },
        ...maps.map((m) => ({ label: relative(dir, m).split('\\').join('/'), href: relative(dir, m).split('\\').join('/') })),
      ],
    }),
  );
  return { dir, html, figures: figureFiles, tables, maps, all: [...written].sort(), warnings };
}
