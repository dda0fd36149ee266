/**
 * Text on its way to a terminal. Names and cells from user files may carry
 * control characters that a terminal obeys: ESC sequences (clear the screen,
 * set the window title, hide a hyperlink: ECMA-48 and the xterm OSC codes),
 * the C1 controls U+0080-U+009F (U+009B is an 8-bit CSI), and the Unicode
 * bidirectional overrides and isolates, which reorder what is shown (Unicode
 * Standard Annex #9). Each is shown as '?'; newline and tab stay. The tool's
 * own progress line is kept: it rewrites itself with CR and "erase line"
 * (ESC [ K), and no other sequence.
 */
const PROGRESS_REWRITE = '\r\u001b[K';
const CONTROL = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/g;
const HAS_CONTROL = new RegExp(CONTROL.source);

export function forTerminal(text: string): string {
  if (!HAS_CONTROL.test(text)) return text;
  return text
    .split(PROGRESS_REWRITE)
    .map((part) => part.replace(CONTROL, '?'))
    .join(PROGRESS_REWRITE);
}

/** A stream whose text is passed through forTerminal; everything else is the stream's own. */
export function terminalSafe<S extends NodeJS.WritableStream>(stream: S): S {
  const write = stream.write.bind(stream) as (chunk: unknown, ...rest: unknown[]) => boolean;
  return new Proxy(stream, {
    get(target, key) {
      if (key === 'write') return (chunk: unknown, ...rest: unknown[]) => write(typeof chunk === 'string' ? forTerminal(chunk) : chunk, ...rest);
      const v = Reflect.get(target, key, target) as unknown;
      return typeof v === 'function' ? (v as (...a: unknown[]) => unknown).bind(target) : v;
    },
  });
}
