/**
 * The category colours (src/report/theme.ts) against published thresholds:
 * - contrast against the white background at least 3:1, the WCAG 2.1 minimum
 *   for graphical objects (success criterion 1.4.11), with WCAG 2.1's
 *   relative luminance and contrast ratio;
 * - every pair apart by Delta E*ab >= 20 (CIE 1976 L*a*b*, D65 white; common
 *   practice: about 2.3 is a just-noticeable difference, 20 a clearly
 *   different category) for normal vision and as seen with deuteranopia and
 *   protanopia, simulated with the matrices of Machado, Oliveira & Fernandes
 *   (2009, IEEE TVCG 15, 1291), severity 1.0, applied to linear RGB;
 * - each figure's colour scales use distinct colours that pass the same test.
 */
import { describe, expect, it } from 'vitest';
import { buildFigures } from '../../src/report/figures/index.ts';
import { CATEGORY_COLOURS, CATEGORY_DASHES, MIN_CONTRAST_ON_WHITE } from '../../src/report/theme.ts';
import { syntheticInput } from './fixture.ts';

const MIN_DELTA_E = 20;

/** sRGB component to linear light (IEC 61966-2-1, the formula WCAG 2.1 quotes). */
function linear(hex: string): [number, number, number] {
  const c = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255);
  return c.map((v) => (v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4)) as [number, number, number];
}

/** WCAG 2.1 relative luminance and contrast ratio against white (luminance 1). */
function contrastOnWhite(hex: string): number {
  const [r, g, b] = linear(hex);
  return 1.05 / (0.2126 * r + 0.7152 * g + 0.0722 * b + 0.05);
}

/** CIE 1976 L*a*b* of linear sRGB (D65). */
function lab([r, g, b]: number[]): [number, number, number] {
  const [rr, gg, bb] = [r, g, b].map((v) => Math.min(1, Math.max(0, v)));
  const x = (0.4124 * rr + 0.3576 * gg + 0.1805 * bb) / 0.95047;
  const y = 0.2126 * rr + 0.7152 * gg + 0.0722 * bb;
  const z = (0.0193 * rr + 0.1192 * gg + 0.9505 * bb) / 1.08883;
  const f = (t: number) => (t > 0.008856 ? Math.cbrt(t) : 7.787 * t + 16 / 116);
  return [116 * f(y) - 16, 500 * (f(x) - f(y)), 200 * (f(y) - f(z))];
}

/** Machado, Oliveira & Fernandes (2009), severity 1.0. */
const SIMULATIONS: Record<string, number[][] | null> = {
  normal: null,
  deuteranopia: [
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.01182, 0.04294, 0.968881],
  ],
  protanopia: [
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
  ],
};

function seen(hex: string, m: number[][] | null): [number, number, number] {
  const c = linear(hex);
  return lab(m ? m.map((row) => row[0] * c[0] + row[1] * c[1] + row[2] * c[2]) : c);
}

function minDeltaE(colours: readonly string[], m: number[][] | null): { d: number; pair: string } {
  let best = { d: Infinity, pair: '' };
  for (let i = 0; i < colours.length; i++)
    for (let j = i + 1; j < colours.length; j++) {
      const a = seen(colours[i], m);
      const b = seen(colours[j], m);
      const d = Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
      if (d < best.d) best = { d, pair: `${colours[i]} ${colours[j]}` };
    }
  return best;
}

describe('category colours', () => {
  it('checks its own arithmetic against WCAG 2.1: black on white is 21:1, mid grey #777777 about 4.48:1', () => {
    expect(contrastOnWhite('#000000')).toBeCloseTo(21, 6);
    expect(contrastOnWhite('#777777')).toBeCloseTo(4.48, 2);
    // A pale yellow of Okabe and Ito's palette fails the 3:1 minimum: the check can fail.
    expect(contrastOnWhite('#F0E442')).toBeLessThan(MIN_CONTRAST_ON_WHITE);
  });

  it(`keeps at least ${MIN_CONTRAST_ON_WHITE}:1 against white for every colour (WCAG 2.1 SC 1.4.11)`, () => {
    expect(MIN_CONTRAST_ON_WHITE).toBeGreaterThanOrEqual(3);
    for (const c of CATEGORY_COLOURS) expect(contrastOnWhite(c), c).toBeGreaterThanOrEqual(MIN_CONTRAST_ON_WHITE);
  });

  it.each(Object.keys(SIMULATIONS))(`keeps every pair apart by Delta E*ab >= ${MIN_DELTA_E} (%s)`, (vision) => {
    expect(new Set(CATEGORY_COLOURS.map((c) => c.toUpperCase())).size).toBe(CATEGORY_COLOURS.length);
    const { d, pair } = minDeltaE(CATEGORY_COLOURS, SIMULATIONS[vision]);
    expect(d, pair).toBeGreaterThanOrEqual(MIN_DELTA_E);
  });

  it('has dash patterns, all distinct, to tell lines apart in greyscale', () => {
    expect(new Set(CATEGORY_DASHES.map((d) => d.join(','))).size).toBe(CATEGORY_DASHES.length);
  });

  it('gives each quantity of a figure its own colour, each passing the contrast minimum', () => {
    const input = syntheticInput({ config: { formats: ['svg'] } });
    for (const fig of buildFigures(input, [])) {
      const ranges = [...JSON.stringify(fig.spec).matchAll(/"color":\{"field":"quantity"[^}]*"scale":\{"domain":(\[[^\]]*\]),"range":(\[[^\]]*\])/g)];
      for (const m of ranges) {
        const domain = JSON.parse(m[1]) as string[];
        const range = JSON.parse(m[2]) as string[];
        expect(new Set(range).size, fig.name).toBe(domain.length);
        for (const c of range) expect(contrastOnWhite(c), `${fig.name} ${c}`).toBeGreaterThanOrEqual(MIN_CONTRAST_ON_WHITE);
      }
      if (fig.kind === 'tracks') expect(ranges.length, fig.name).toBeGreaterThan(0);
    }
  });
});
