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
