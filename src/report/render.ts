/**
 * Rendering figure specs in Node, with no browser: Vega-Lite -> Vega -> SVG
 * (vega's headless view), SVG -> PNG (resvg, with the bundled DejaVu fonts,
 * since resvg silently drops text it has no font for), SVG -> vector PDF
 * (pdfkit + svg-to-pdfkit, with the same fonts embedded).
 *
 * Units: one Vega pixel is drawn as one PDF point (1/72 in), so a spec sized
 * for a 3.4 in column is 245 px wide and its PDF page is 3.4 in wide.
 */
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { Resvg } from '@resvg/resvg-js';
import PDFDocument from 'pdfkit';
import SVGtoPDF from 'svg-to-pdfkit';
import * as vega from 'vega';
import { compile, type TopLevelSpec } from 'vega-lite';
import { FIGURE_FONT } from './theme.ts';

const require = createRequire(import.meta.url);

/** Folder of the DejaVu TTF files shipped in the npm package dejavu-fonts-ttf. */
const FONT_DIR = join(dirname(require.resolve('dejavu-fonts-ttf/package.json')), 'ttf');
export const FONT_FILES = {
  regular: join(FONT_DIR, 'DejaVuSans.ttf'),
  bold: join(FONT_DIR, 'DejaVuSans-Bold.ttf'),
  italic: join(FONT_DIR, 'DejaVuSans-Oblique.ttf'),
  boldItalic: join(FONT_DIR, 'DejaVuSans-BoldOblique.ttf'),
};

const POINTS_PER_INCH = 72;
/** A fixed date for PDF metadata, so the same figure gives the same file. */
const PDF_METADATA_DATE = new Date(Date.UTC(2000, 0, 1));

export interface RenderedSvg {
  svg: string;
  /** What vega-lite and vega warned about while compiling and drawing. */
  warnings: string[];
  /** Size of the drawing in Vega pixels (= PDF points). */
  width: number;
  height: number;
}

/** Compile a Vega-Lite spec and render it to SVG with vega's headless view. */
export async function renderSvg(spec: TopLevelSpec): Promise<RenderedSvg> {
  const warnings: string[] = [];
  const logger = collectingLogger(warnings);
  const vgSpec = compile(spec, { logger }).spec;
  const view = new vega.View(vega.parse(vgSpec), { renderer: 'none', logger });
  try {
    const svg = await view.toSVG();
    const { width, height } = svgSize(svg);
    return { svg, warnings, width, height };
  } finally {
    view.finalize();
  }
}

/** PNG at a resolution given in dots per inch (a Vega pixel is 1/72 in). */
export function svgToPng(svg: string, dpi: number): Buffer {
  const resvg = new Resvg(svg, {
    font: {
      loadSystemFonts: false,
      fontFiles: Object.values(FONT_FILES),
      defaultFontFamily: FIGURE_FONT,
      sansSerifFamily: FIGURE_FONT,
      serifFamily: FIGURE_FONT,
    },
    fitTo: { mode: 'zoom', value: dpi / POINTS_PER_INCH },
    background: 'white',
    logLevel: 'off',
  });
  return resvg.render().asPng();
}

/** A one-page vector PDF the size of the figure, with DejaVu Sans embedded. */
export function svgToPdf(rendered: RenderedSvg, title: string): Promise<Buffer> {
  const doc = new PDFDocument({
    size: [rendered.width, rendered.height],
    margin: 0,
    info: { Title: title, Creator: 'hoarfrost', Producer: 'hoarfrost (pdfkit)', CreationDate: PDF_METADATA_DATE, ModDate: PDF_METADATA_DATE },
  });
  doc.registerFont('FigureRegular', FONT_FILES.regular);
  doc.registerFont('FigureBold', FONT_FILES.bold);
  doc.registerFont('FigureItalic', FONT_FILES.italic);
  doc.registerFont('FigureBoldItalic', FONT_FILES.boldItalic);
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolvePdf, reject) => {
    doc.on('data', (c: Buffer) => chunks.push(c));
    doc.on('end', () => resolvePdf(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  SVGtoPDF(doc, solidDashesRemoved(rendered.svg), 0, 0, {
    width: rendered.width,
    height: rendered.height,
    assumePt: true,
    // Every family maps to DejaVu: the specs ask for it, and a PDF must not depend on the reader's fonts.
    fontCallback: (_family: string, bold: boolean, italic: boolean) =>
      bold && italic ? 'FigureBoldItalic' : bold ? 'FigureBold' : italic ? 'FigureItalic' : 'FigureRegular',
  });
  doc.end();
  return done;
}

/**
 * A dash pattern whose gaps are all zero (`1,0`: how a legend asks for a
 * solid line) is a solid line in SVG, but pdfkit refuses zero lengths:
 * such patterns are dropped before the PDF is drawn.
 */
export function solidDashesRemoved(svg: string): string {
  return svg.replace(/\sstroke-dasharray="([^"]*)"/g, (attr, value: string) => {
    const lengths = value.split(/[\s,]+/).filter((x) => x !== '').map(Number);
    const gapsZero = lengths.length > 0 && lengths.every((v, i) => i % 2 === 0 || v === 0);
    return gapsZero ? '' : attr;
  });
}

/** A logger for vega-lite's compiler and vega's view that keeps warnings and errors instead of printing them. */
function collectingLogger(sink: string[]): vega.LoggerInterface {
  let level = vega.Warn;
  const logger: vega.LoggerInterface = {
    level(l?: number) {
      if (l === undefined) return level;
      level = l;
      return logger;
    },
    error: (...args: readonly unknown[]) => {
      sink.push(args.map(String).join(' '));
      return logger;
    },
    warn: (...args: readonly unknown[]) => {
      sink.push(args.map(String).join(' '));
      return logger;
    },
    info: () => logger,
    debug: () => logger,
  } as vega.LoggerInterface;
  return logger;
}

function svgSize(svg: string): { width: number; height: number } {
  const m = /<svg[^>]*\swidth="([\d.]+)"[^>]*\sheight="([\d.]+)"/.exec(svg);
  if (!m) throw new Error('vega produced an SVG without width and height');
  return { width: Number(m[1]), height: Number(m[2]) };
}
