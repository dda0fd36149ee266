/**
 * Text from user files (sightline names, species labels, comments, FITS
 * header values) is data. These helpers make it appear as written, and
 * nothing more, in each output language the report writes.
 */

const HTML_ENTITIES: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
};

/** Escape text for HTML element content and quoted attribute values. */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => HTML_ENTITIES[c]);
}

/**
 * Serialise a value as JSON safe to place inside an HTML `<script>` element:
 * `<`, `>`, `&` and the line separators U+2028/U+2029 become \u escapes, so no
 * `</script>` or `<!--` can end or change the element, whatever the data holds.
 */
export function jsonForScript(value: unknown): string {
  return JSON.stringify(value).replace(/[<>&\u2028\u2029]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`);
}

/**
 * Make a library's JavaScript source safe to inline in a `<script>` element.
 * `</script` (any case) would end the element early and `<!--` can keep a
 * later `</script>` from ending it (HTML Living Standard, script data
 * escaped states). They become `<\/script` and `<\x21--`: the same text to
 * the JavaScript parser inside string and regular-expression literals (also
 * with the `u` flag), the only places a bundle can hold them.
 */
export function inlineScriptSource(source: string): string {
  return source.replace(/<\/(script)/gi, '<\\/$1').replace(/<!--/g, '<\\x21--');
}

const LATEX_SPECIALS: Record<string, string> = {
  '\\': '\\textbackslash{}',
  '{': '\\{',
  '}': '\\}',
  $: '\\$',
  '&': '\\&',
  '#': '\\#',
  '%': '\\%',
  _: '\\_',
  '^': '\\textasciicircum{}',
  '~': '\\textasciitilde{}',
  '<': '\\textless{}',
  '>': '\\textgreater{}',
  '|': '\\textbar{}',
};

/**
 * Escape text for LaTeX running text: LaTeX's ten special characters
 * (# $ % & ~ _ ^ \ { }, common practice) plus < > |, which the default OT1
 * font encoding prints as other glyphs. Control characters and line breaks
 * become spaces, so user text cannot end a table row.
 */
export function escapeLatex(text: string): string {
  return text.replace(/[\u0000-\u001f\u007f]/g, ' ').replace(/[\\{}$&#%_^~<>|]/g, (c) => LATEX_SPECIALS[c]);
}

/** A file-name fragment from user text (a sightline name): ASCII letters, digits, `-` and `_` only. */
export function slug(text: string, maxLength = 40): string {
  const s = text
    .normalize('NFKD')
    .replace(/[^A-Za-z0-9_-]+/g, '-')
    .replace(/-+/g, '-')
    .replace(/^-|-$/g, '')
    .slice(0, maxLength);
  return s === '' ? 'x' : s;
}
