import { describe, expect, it } from 'vitest';
import { formatDuration, progressBar, progressLine, ProgressPrinter } from '../../src/grid/progress.ts';
import type { GridProgress } from '../../src/grid/run.ts';
import { sink } from '../support/sink.ts';

const at = (done: number, extra: Partial<GridProgress> = {}): GridProgress => ({ done, total: 1000, failed: 3, computed: done, elapsedMs: 60_000, ratePerMinute: 95.2, remainingMs: 371_000, ...extra });

describe('grid progress', () => {
  it('states done/total, failures, rate and time left', () => {
    expect(progressLine(at(412))).toBe('412/1000 models, 3 failed, 95.2/min, 6m11s left');
    expect(progressBar(at(500))).toBe(`[${'#'.repeat(14)}${'.'.repeat(14)}] 500/1000 models, 3 failed, 95.2/min, 6m11s left`);
    expect(progressLine(at(0, { remainingMs: undefined, ratePerMinute: 0 }))).toBe('0/1000 models, 3 failed, 0.00/min');
    expect([formatDuration(59_400), formatDuration(3_600_000 * 5 + 60_000 * 7), formatDuration(86_400_000 * 3)]).toEqual(['59s', '5h07m', '3d00h']);
  });

  it('redraws one line in place on a terminal', () => {
    const s = sink();
    const p = new ProgressPrinter(s.stream, { tty: true, intervalMs: 0 });
    p.update(at(1));
    p.message('note');
    p.update(at(1000, { remainingMs: 0 }));
    p.finish();
    expect(s.text()).toBe(
      `\r\x1b[K${progressBar(at(1))}\r\x1b[Knote\n\r\x1b[K${progressBar(at(1))}\r\x1b[K${progressBar(at(1000, { remainingMs: 0 }))}\n`,
    );
  });

  it('prints plain lines at intervals otherwise, and always the last', () => {
    const s = sink();
    const p = new ProgressPrinter(s.stream, { tty: false, intervalMs: 60_000 });
    for (let i = 1; i <= 1000; i++) p.update(at(i));
    p.finish();
    const lines = s.text().trimEnd().split('\n');
    expect(lines[0]).toBe('grid: 1/1000 models, 3 failed, 95.2/min, 6m11s left');
    expect(lines.at(-1)).toBe('grid: 1000/1000 models, 3 failed, 95.2/min, 6m11s left');
    expect(lines).toHaveLength(2);
  });
});
