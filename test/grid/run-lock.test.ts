/**
 * The run lock of a store: taken atomically, taken over from a dead holder by
 * exactly one of two processes that try at once, released only by its
 * holder. Two long-lived processes contend 300 times (each trial starts from
 * a lock left by a dead process), so the test stays fast.
 */
import { fork, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { hostname, tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { acquireRunLock } from '../../src/grid/run-lock.ts';

const dir = mkdtempSync(join(tmpdir(), 'hoarfrost-run-lock-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const CONTENDER = join(import.meta.dirname, 'fixtures/lock-contender.mjs');

interface Answer {
  trial?: number;
  outcome?: 'held' | 'refused' | 'error' | 'released';
  message?: string;
  ready?: boolean;
}

function start(): Promise<{ child: ChildProcess; next: () => Promise<Answer> }> {
  const child = fork(CONTENDER, [], { stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
  const queue: Answer[] = [];
  const waiting: ((a: Answer) => void)[] = [];
  child.on('message', (a: Answer) => {
    const w = waiting.shift();
    if (w) w(a);
    else queue.push(a);
  });
  const next = () => new Promise<Answer>((resolve) => {
    const a = queue.shift();
    if (a) resolve(a);
    else waiting.push(resolve);
  });
  return next().then(() => ({ child, next }));
}

/** A process id that no longer runs. */
const deadPid = (): number => spawnSync(process.execPath, ['-e', '']).pid!;

describe('run lock', () => {
  it('of 300 simultaneous takeovers of a dead holder\'s lock by two processes, each gives the lock to exactly one, with no raw error', async () => {
    const store = join(dir, 'contended.sqlite');
    const lock = `${store}.running`;
    const [a, b] = await Promise.all([start(), start()]);
    const dead = deadPid();
    let doubles = 0;
    let nobody = 0;
    const errors: string[] = [];
    try {
      for (let trial = 0; trial < 300; trial++) {
        writeFileSync(lock, JSON.stringify({ pid: dead, host: hostname(), started: '2026-01-01T00:00:00Z' }));
        a.child.send({ do: 'take', store, trial });
        b.child.send({ do: 'take', store, trial });
        const [ra, rb] = await Promise.all([a.next(), b.next()]);
        for (const r of [ra, rb]) if (r.outcome === 'error') errors.push(r.message ?? '');
        const holders = [ra, rb].filter((r) => r.outcome === 'held').length;
        if (holders > 1) doubles++;
        if (holders === 0) nobody++;
        for (const [c, r] of [[a, ra], [b, rb]] as const) {
          if (r.outcome !== 'held') continue;
          c.child.send({ do: 'release', trial });
          await c.next();
        }
        expect(existsSync(lock)).toBe(false);
      }
    } finally {
      for (const c of [a, b]) c.child.send({ do: 'exit' });
    }
    expect(errors).toEqual([]);
    expect(doubles).toBe(0);
    expect(nobody).toBe(0);
  }, 120_000);

  it('release removes only its own lock, not one another run took after it', () => {
    const store = join(dir, 'own.sqlite');
    const lock = `${store}.running`;
    const release = acquireRunLock(store);
    const theirs = JSON.stringify({ pid: process.ppid, host: hostname(), started: '2026-01-02T00:00:00Z', token: 'another-run' });
    writeFileSync(lock, theirs);
    release();
    expect(readFileSync(lock, 'utf8')).toBe(theirs);
    rmSync(lock);
  });

  it('a second take by a live holder is refused with who holds it', () => {
    const store = join(dir, 'live.sqlite');
    const release = acquireRunLock(store);
    try {
      expect(() => acquireRunLock(store)).toThrow(/another hoarfrost grid \(process \d+, started .*\) is computing into this store/);
    } finally {
      release();
    }
    expect(existsSync(`${store}.running`)).toBe(false);
  });
});
