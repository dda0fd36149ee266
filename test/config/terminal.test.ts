/** Text on its way to a terminal: control characters shown as '?', the tool's own progress rewrite kept. */
import { describe, expect, it } from 'vitest';
import { forTerminal } from '../../src/config/terminal.ts';

describe('forTerminal', () => {
  it('shows ESC sequences (ECMA-48 CSI, xterm OSC), BEL, C1 controls and bidi overrides (UAX #9) as ?', () => {
    expect(forTerminal('a\u001b[2Jb')).toBe('a?[2Jb');
    expect(forTerminal('\u001b]0;title\u0007x')).toBe('?]0;title?x');
    expect(forTerminal('c\u009b31md')).toBe('c?31md');
    expect(forTerminal('e\u202ef\u2066g')).toBe('e?f?g');
    expect(forTerminal('\u0000\u007f')).toBe('??');
  });

  it('keeps newline, tab, ordinary Unicode and the progress line rewrite (CR, ESC [ K)', () => {
    expect(forTerminal('H2O(s)\tN\n\u00b5m \u00e9')).toBe('H2O(s)\tN\n\u00b5m \u00e9');
    expect(forTerminal('\r\u001b[K[=== ] 3/9')).toBe('\r\u001b[K[=== ] 3/9');
    expect(forTerminal('\r\u001b[Kname\u001b[2J')).toBe('\r\u001b[Kname?[2J');
  });
});
