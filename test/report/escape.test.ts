/**
 * Text from user files is data: escaped for HTML, LaTeX and inline
 * scripts (SVG text is escaped by vega: checked in figures.test.ts) so that it shows as written and runs nothing.
 */
import { describe, expect, it } from 'vitest';
import { escapeHtml, escapeLatex, inlineScriptSource, jsonForScript, slug } from '../../src/report/escape.ts';

describe('escapeHtml', () => {
  it('escapes the five characters HTML gives meaning to (HTML Living Standard, character references)', () => {
    expect(escapeHtml('<script>alert(1)</script>')).toBe('&lt;script&gt;alert(1)&lt;/script&gt;');
    expect(escapeHtml(`a & b "c" 'd'`)).toBe('a &amp; b &quot;c&quot; &#39;d&#39;');
    expect(escapeHtml('50%_&_#1')).toBe('50%_&amp;_#1');
  });
  it('escapes an ampersand once, so an entity in the data stays visible as written', () => {
    expect(escapeHtml('&lt;')).toBe('&amp;lt;');
  });
});

describe('escapeLatex', () => {
  it("escapes LaTeX's ten special characters (common practice)", () => {
    expect(escapeLatex('50%_&_#1')).toBe('50\\%\\_\\&\\_\\#1');
    expect(escapeLatex('$x^2$ ~ {a} \\b')).toBe('\\$x\\textasciicircum{}2\\$ \\textasciitilde{} \\{a\\} \\textbackslash{}b');
  });
  it('escapes < > | (printed as other glyphs in the OT1 encoding) and turns line breaks into spaces', () => {
    expect(escapeLatex('<script>alert(1)</script>')).toBe('\\textless{}script\\textgreater{}alert(1)\\textless{}/script\\textgreater{}');
    expect(escapeLatex('a|b\nc\\\\d')).toBe('a\\textbar{}b c\\textbackslash{}\\textbackslash{}d');
  });
  it('leaves no unescaped special character behind', () => {
    const nasty = '\\end{deluxetable*}\\input{/etc/passwd}%&$#_^~{}';
    const out = escapeLatex(nasty);
    // Every backslash in the output starts one of our escapes.
    expect(out.replace(/\\(textbackslash|textasciicircum|textasciitilde|textless|textgreater|textbar)\{\}|\\[{}$&#%_]/g, '')).not.toMatch(/[\\{}$&#%_^~]/);
  });
});

describe('scripts', () => {
  it('JSON for a <script> element cannot close it or open a comment', () => {
    const s = jsonForScript({ name: '</script><script>alert(1)</script><!--' });
    expect(s).not.toMatch(/<|>/);
    expect(JSON.parse(s)).toEqual({ name: '</script><script>alert(1)</script><!--' });
  });
  it('inlined library source has no </script in any case', () => {
    const src = 'var a = "</script>"; var b = /<\\/SCRIPT>/u; var c = "</Script"; var d = "<!--"; var e = /<!--x/u;';
    const out = inlineScriptSource(src);
    expect(out).not.toMatch(/<\/script|<!--/i);
    // The same JavaScript values: `<\/` is `</` and `\x21` is `!` in strings and in u-flag regular expressions.
    const f = new Function(`${out}; return [a, c, d, b.test('</SCRIPT>'), e.test('<!--x')];`) as () => unknown[];
    expect(f()).toEqual(['</script>', '</Script', '<!--', true, true]);
  });
});

describe('slug', () => {
  it('keeps letters, digits, - and _ only', () => {
    expect(slug('<script>alert(1)</script>')).toBe('script-alert-1-script');
    expect(slug('../../x')).toBe('x');
    expect(slug('%%%')).toBe('x');
    expect(slug('Frostmere-01')).toBe('Frostmere-01');
  });
});
