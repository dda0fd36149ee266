/**
 * The HTML report in a real headless Chromium (Debian's chromium driven by
 * playwright-core): it loads from file:// with no console error, no page
 * error and no network request, every figure renders (SVG marks counted),
 * and hostile sightline names show as text and run nothing. Without
 * chromium the test is skipped with a message; with
 * HOARFROST_REQUIRE_CHROMIUM=1 (CI) it fails instead.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { writeReport } from '../../src/report/index.ts';
import type { ReportFiles } from '../../src/report/types.ts';
import { CHROMIUM, CHROMIUM_REFERENCE, describeWithReference } from '../support/references.ts';
import { HOSTILE_NAMES, syntheticInput } from './fixture.ts';

/** Flags from figures-notes.md: no sandbox (root in a container), no GPU, nothing fetched in the background. */
const FLAGS = ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];
const READY_TIMEOUT_MS = 30_000;

interface PageRun {
  messages: string[];
  requests: string[];
  dialogs: string[];
  ready: string | null;
  svgs: number;
  /** Marks per figure: path/line/text elements inside the vega mark groups. */
  marksPerFigure: number[];
  summaryText: string;
  jointText: string;
  scriptsInBody: number;
}

async function loadReport(context: BrowserContext, html: string): Promise<PageRun> {
  const page = await context.newPage();
  const messages: string[] = [];
  const requests: string[] = [];
  const dialogs: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') messages.push(`${m.type()}: ${m.text()}`);
  });
  page.on('pageerror', (e) => messages.push(`pageerror: ${e.message}`));
  page.on('dialog', (d) => {
    dialogs.push(d.message());
    void d.dismiss();
  });
  page.on('request', (r) => {
    if (!r.url().startsWith('file:')) requests.push(r.url());
  });
  await page.goto(pathToFileURL(html).href);
  await page.waitForFunction("document.body.getAttribute('data-ready') !== 'false'", null, { timeout: READY_TIMEOUT_MS });
  const ready = await page.getAttribute('body', 'data-ready');
  const svgs = await page.locator('.vis svg').count();
  const marksPerFigure = await page.$$eval('.vis svg', (list) => list.map((svg) => svg.querySelectorAll('g.mark-rect path, g.mark-symbol path, g.mark-line path, g.mark-rule line').length));
  const summaryText = (await page.textContent('#summary table')) ?? '';
  const jointText = (await page.locator('#joint').count()) > 0 ? ((await page.textContent('#joint table')) ?? '') : '';
  const scriptsInBody = await page.locator('script').count();
  await page.close();
  return { messages, requests, dialogs, ready, svgs, marksPerFigure, summaryText, jointText, scriptsInBody };
}

describeWithReference(CHROMIUM_REFERENCE, 'HTML report in headless Chromium', () => {
  let context: BrowserContext;
  let userDataDir: string;
  let dir: string;
  let table: ReportFiles;
  let map: ReportFiles;
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'hoarfrost-html-'));
    table = await writeReport(syntheticInput({ joint: true, config: { formats: ['svg'] } }), join(dir, 'table'));
    map = await writeReport(syntheticInput({ map: { nx: 8, ny: 6 }, config: { formats: ['svg'], sightlines: ['Frostmere-01'] } }), join(dir, 'map'));
    userDataDir = mkdtempSync(join(tmpdir(), 'hoarfrost-chromium-'));
    context = await chromium.launchPersistentContext(userDataDir, { executablePath: CHROMIUM, headless: true, args: FLAGS });
  });
  afterAll(async () => {
    await context?.close();
    for (const d of [userDataDir, dir]) if (d) rmSync(d, { recursive: true, force: true });
  });

  it('loads the table report with no console error and draws every figure', async () => {
    const run = await loadReport(context, table.html);
    expect(run.messages).toEqual([]);
    expect(run.requests).toEqual([]);
    expect(run.ready).toBe('true');
    expect(run.svgs).toBe(table.figures.length);
    // Every figure has marks: cells, contour segments, points, lines (a figure that failed to draw has none).
    for (const [i, n] of run.marksPerFigure.entries()) expect(n, table.figures[i].name).toBeGreaterThan(5);
  });

  it('shows hostile sightline names as text and runs none of them', async () => {
    const run = await loadReport(context, table.html);
    expect(run.dialogs).toEqual([]);
    for (const name of HOSTILE_NAMES) expect(run.summaryText).toContain(name);
    expect(run.jointText).toContain('<b>core</b>');
    // Three bundles, the figure data and the main script: no script element came from the data.
    expect(run.scriptsInBody).toBe(5);
  });

  it('loads the map report and draws the sky images', async () => {
    const run = await loadReport(context, map.html);
    expect(run.messages).toEqual([]);
    expect(run.ready).toBe('true');
    expect(run.svgs).toBe(map.figures.length);
    const sky = map.figures.findIndex((f) => f.name === 'sky_map_best_density');
    // 8 x 6 pixels, one without a fit: 47 cells.
    expect(run.marksPerFigure[sky]).toBeGreaterThanOrEqual(47);
  });

  it('lets no table or figure overflow its container at 1280 px', async () => {
    for (const report of [table, map]) {
      const page = await context.newPage();
      const errors: string[] = [];
      page.on('console', (m) => {
        if (m.type() === 'error') errors.push(m.text());
      });
      await page.setViewportSize({ width: 1280, height: 900 });
      await page.goto(pathToFileURL(report.html).href);
      await page.waitForFunction("document.body.getAttribute('data-ready') !== 'false'", null, { timeout: READY_TIMEOUT_MS });
      // Boxes measured as laid out: each table inside its scroll box, each figure's SVG inside its figure, each figure inside the page's body.
      // Run in the page (a string: the test's TypeScript has no DOM types).
      const overflows = (await page.evaluate(`(() => {
        const out = [];
        const body = document.body.getBoundingClientRect();
        const inside = (a, b) => a.left >= b.left - 0.5 && a.right <= b.right + 0.5;
        document.querySelectorAll('table').forEach((t, i) => {
          const box = t.parentElement.getBoundingClientRect();
          if (!inside(t.getBoundingClientRect(), box) || !inside(t.getBoundingClientRect(), body)) out.push(\`table \${i} (\${t.className}): \${Math.round(t.getBoundingClientRect().width)} px in \${Math.round(box.width)} px\`);
        });
        document.querySelectorAll('figure').forEach((f, i) => {
          const svg = f.querySelector('svg');
          if (!svg) return out.push(\`figure \${i}: no SVG\`);
          const r = f.getBoundingClientRect();
          if (!inside(svg.getBoundingClientRect(), r)) out.push(\`figure \${i}: SVG \${Math.round(svg.getBoundingClientRect().width)} px in \${Math.round(r.width)} px\`);
          if (!inside(r, body)) out.push(\`figure \${i} leaves the page\`);
        });
        if (document.documentElement.scrollWidth > window.innerWidth) out.push(\`page \${document.documentElement.scrollWidth} px wide\`);
        return out;
      })()`)) as string[];
      await page.close();
      expect(errors).toEqual([]);
      expect(overflows, report.html).toEqual([]);
    }
  });
});
