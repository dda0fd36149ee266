import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { UserError } from '../../src/config/errors.ts';
import { buildLock, compareWithLock, formatComparison, readLock, writeLock, type LockedFit } from '../../src/pipeline/lock.ts';

const fit = (sightline: string, density: number, ageYr: number): LockedFit => ({
  sightline,
  density,
  densityLo: density / 2,
  densityHi: density * 2,
  ageYr,
  ageLoYr: ageYr / 3,
  ageHiYr: ageYr * 3,
  chi2: 4.2,
});

let dir: string;
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'hoarfrost-lock-'));
});
afterEach(() => rmSync(dir, { recursive: true, force: true }));

describe('lock files', () => {
  const fits = [fit('star-2', 1e4, 3e5), fit('star-1', 3e4, 1e6)];
  const tables = { 'fit/best_fits.csv': 'aa', 'report/best_fits.tex': 'bb' };

  it('round-trips and is written the same way every time (sorted, no timestamp)', () => {
    const file = join(dir, 'a.lock.json');
    writeLock(file, buildLock('demo', fits, tables, { densityDex: 0.1, ageDex: 0.2 }));
    const first = readFileSync(file, 'utf8');
    writeLock(file, buildLock('demo', [...fits].reverse(), tables, { densityDex: 0.1, ageDex: 0.2 }));
    expect(readFileSync(file, 'utf8')).toBe(first);
    const lock = readLock(file);
    expect(lock.sightlines.map((s) => s.sightline)).toEqual(['star-1', 'star-2']);
    expect(lock.tolerance).toEqual({ densityDex: 0.1, ageDex: 0.2 });
  });

  it('passes when nothing moved', () => {
    const c = compareWithLock(buildLock('demo', fits, tables, { densityDex: 0.1, ageDex: 0.1 }), fits, tables);
    expect(c.passed).toBe(true);
    expect(c.moved).toEqual([]);
    expect(formatComparison(c, 'x.lock')).toContain('passed');
  });

  it('lists a sightline whose density moved beyond the tolerance, with the size of the move', () => {
    const lock = buildLock('demo', fits, tables, { densityDex: 0.1, ageDex: 0.1 });
    // 10^0.301 = 2: a factor of 2 is 0.301 dex, beyond 0.1 dex.
    const now = [fit('star-2', 2e4, 3e5), fit('star-1', 3e4, 1e6)];
    const c = compareWithLock(lock, now, tables);
    expect(c.passed).toBe(false);
    expect(c.moved.map((m) => m.sightline)).toEqual(['star-2']);
    expect(c.moved[0].changes[0]).toBe('best density moved 0.301 dex (> 0.1 dex): 1.00e+4 -> 2.00e+4 cm^-3');
    expect(formatComparison(c, 'x.lock')).toMatch(/FAILED; 1 sightline moved.*\n  star-2: best density moved/);
  });

  it('a move inside the tolerance passes; a wider tolerance from the command line overrides the lock', () => {
    const lock = buildLock('demo', fits, tables, { densityDex: 0.1, ageDex: 0.1 });
    const small = [fit('star-2', 1.2e4, 3e5), fit('star-1', 3e4, 1e6)]; // log10(1.2) = 0.079 dex
    expect(compareWithLock(lock, small, tables).passed).toBe(true);
    const large = [fit('star-2', 1e4, 3e6), fit('star-1', 3e4, 1e6)]; // 1 dex in age
    expect(compareWithLock(lock, large, tables).passed).toBe(false);
    expect(compareWithLock(lock, large, tables, { ageDex: 1.5 }).passed).toBe(true);
  });

  it('reports sightlines that appeared or disappeared, and tables whose bytes changed', () => {
    const lock = buildLock('demo', fits, tables, { densityDex: 0.1, ageDex: 0.1 });
    const c = compareWithLock(lock, [fit('star-1', 3e4, 1e6), fit('star-9', 1e5, 1e5)], { ...tables, 'fit/best_fits.csv': 'cc' });
    expect(c.moved.map((m) => `${m.sightline}: ${m.changes[0]}`)).toEqual([
      'star-2: is in the lock file but has no fit in this run',
      'star-9: has a fit in this run but is not in the lock file',
    ]);
    expect(c.changedTables).toEqual(['fit/best_fits.csv']);
  });

  it('refuses a missing, malformed or foreign lock file with a clear error', () => {
    expect(() => readLock(join(dir, 'none.json'))).toThrow(/lock file not found/);
    writeFileSync(join(dir, 'bad.json'), '{ nope');
    expect(() => readLock(join(dir, 'bad.json'))).toThrow(UserError);
    writeFileSync(join(dir, 'other.json'), '{"format":"something-else"}');
    expect(() => readLock(join(dir, 'other.json'))).toThrow(/not a hoarfrost lock file/);
    const lock = buildLock('demo', fits, tables, { densityDex: 0.1, ageDex: 0.1 }) as unknown as { sightlines: Record<string, unknown>[] };
    lock.sightlines[0].density = -1;
    writeFileSync(join(dir, 'neg.json'), JSON.stringify(lock));
    expect(() => readLock(join(dir, 'neg.json'))).toThrow("field 'sightlines[0].density': must be a positive number, found -1.");
  });
});
