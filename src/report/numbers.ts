/**
 * Numbers for people: `digits` significant figures, written plainly between
 * 0.01 and 1000 and as mantissa x 10^exponent outside, in the notation of
 * each output (Unicode for figures, HTML, LaTeX).
 */

/** Plain notation is used for rounded values from 10^PLAIN_MIN_EXPONENT up to, not including, 10^PLAIN_MAX_EXPONENT. */
const PLAIN_MIN_EXPONENT = -2;
const PLAIN_MAX_EXPONENT = 3;

export type Significant = { plain: string } | { mantissa: string; exponent: number };

export function significant(x: number, digits = 2): Significant {
  if (x === 0) return { plain: '0' };
  const rounded = Number(x.toPrecision(digits));
  const e = Math.floor(Math.log10(Math.abs(rounded)));
  if (e >= PLAIN_MIN_EXPONENT && e < PLAIN_MAX_EXPONENT) {
    // toPrecision itself would switch to exponent notation for 120 at two digits.
    return { plain: e >= digits - 1 ? String(rounded) : rounded.toFixed(digits - 1 - e) };
  }
  // toExponential rounds the mantissa and carries into the exponent (9.96e4 -> 1.0e+5).
  const [mantissa, exponent] = x.toExponential(digits - 1).split('e');
  return { mantissa, exponent: Number(exponent) };
}

const SUPERSCRIPT: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/** `10⁻⁶` for k = -6. */
export function decadeText(k: number): string {
  return `10${String(k).replace(/[-0-9]/g, (c) => SUPERSCRIPT[c])}`;
}

/** Unicode: `3.0×10⁵`. */
export function numberText(x: number, digits = 2): string {
  if (!Number.isFinite(x)) return String(x);
  const s = significant(x, digits);
  return 'plain' in s ? s.plain : `${s.mantissa}×${decadeText(s.exponent)}`;
}

/** HTML: `3.0×10<sup>5</sup>` (minus sign U+2212); an en dash for a missing value. */
export function numberHtml(x: number | null, digits = 2): string {
  if (x === null || !Number.isFinite(x)) return '–';
  const s = significant(x, digits);
  return 'plain' in s ? s.plain : `${s.mantissa}×10<sup>${s.exponent < 0 ? '−' : ''}${Math.abs(s.exponent)}</sup>`;
}

/** LaTeX math: `3.0\times10^{5}`; `\nodata` (AASTeX) for a missing value. */
export function numberLatex(x: number, digits = 2): string {
  if (!Number.isFinite(x)) return '\\nodata';
  const s = significant(x, digits);
  return 'plain' in s ? s.plain : `${s.mantissa}\\times10^{${s.exponent}}`;
}

/** p-values closer to 1 than this are written as a bound (`> 0.9999`): more digits say nothing a reader can use. */
const P_MAX_DECIMALS = 4;
/** Below this a p-value is written with two significant figures (`0.034`, `1.2×10⁻¹²`); from it up to 1 - 10^-2 with two decimals. */
const P_SIGNIFICANT_BELOW = 0.1;

type Notation = 'text' | 'html' | 'latex';

function render(s: Significant, notation: Notation): string {
  if ('plain' in s) return s.plain;
  if (notation === 'text') return `${s.mantissa}×${decadeText(s.exponent)}`;
  if (notation === 'html') return `${s.mantissa}×10<sup>${s.exponent < 0 ? '−' : ''}${Math.abs(s.exponent)}</sup>`;
  return `${s.mantissa}\\times10^{${s.exponent}}`;
}

/**
 * A p-value with the digits that tell it from 0 and from 1: two significant
 * figures below 0.1, two decimals up to 0.99, and above that as many decimals
 * as 1 - p needs for one significant figure (0.9966 is `0.997`, never `1.0`),
 * `> 0.9999` beyond. LaTeX output is math-mode text.
 */
export function pValueText(p: number, notation: Notation = 'text'): string {
  if (!Number.isFinite(p)) return notation === 'latex' ? '\\nodata' : '–';
  if (p < P_SIGNIFICANT_BELOW) return render(significant(p, 2), notation);
  const q = 1 - p;
  if (q < 10 ** -P_MAX_DECIMALS) return `${notation === 'html' ? '&gt;' : '>'} ${(1 - 10 ** -P_MAX_DECIMALS).toFixed(P_MAX_DECIMALS)}`;
  const decimals = Math.max(2, Math.ceil(-Math.log10(q) - 1e-12));
  return p.toFixed(decimals);
}

/**
 * chi^2 over its degrees of freedom as `2.01/2`: chi^2 with two decimals
 * below 10, one below 100, none above (`1/2` for 1.0025 hid what was fitted).
 */
export function chi2DofText(chi2: number, dof: number): string {
  const decimals = chi2 < 10 ? 2 : chi2 < 100 ? 1 : 0;
  return `${chi2.toFixed(decimals)}/${dof}`;
}
