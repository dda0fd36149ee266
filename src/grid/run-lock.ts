/**
 * One grid run per store: a lock file beside the store (STORE.running) names
 * the process computing into it, so a second `hoarfrost grid` on the same
 * pipeline stops with a clear message instead of computing the same models
 * twice. A lock left by a killed process on this host is taken over.
 * Merging takes the same lock. (Shard stores need none: they are opened
 * with SQLite's exclusive locking.)
 *
 * Atomic throughout: a lock is written whole under a fresh name and then
 * hard-linked to STORE.running (link fails if the name exists, so one
 * process wins and no reader sees a half-written lock); a dead holder's lock
 * is removed only under a second, short-lived lock (STORE.running.takeover)
 * after its token was read again, so two processes taking over at once
 * cannot remove each other's new lock; release removes the lock only while
 * it still carries the holder's own token.
 */
import { randomBytes } from 'node:crypto';
import { linkSync, readFileSync, unlinkSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { UserError } from '../config/errors.ts';

export interface LockInfo {
  pid: number;
  host: string;
  started: string;
  /** Names this one taking of the lock (absent in locks written before tokens). */
  token?: string;
}

/** Rounds of take-or-take-over before giving up: each lost round means another process took the lock in between. */
const ATTEMPTS = 20;

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function missing(e: unknown): boolean {
  return (e as NodeJS.ErrnoException).code === 'ENOENT';
}

/** The lock's holder; undefined when no lock is there; 'unreadable' for a lock that is not ours to read. */
function readLock(file: string): LockInfo | 'unreadable' | undefined {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    if (missing(e)) return undefined;
    throw new UserError(`cannot read the run lock: ${(e as Error).message}.`, { file });
  }
  try {
    const info = JSON.parse(text) as LockInfo;
    return typeof info.pid === 'number' && typeof info.host === 'string' ? info : 'unreadable';
  } catch {
    return 'unreadable';
  }
}

/** Create `file` holding `info`, whole, only if no file of that name exists; false when one does. */
function createWhole(file: string, info: LockInfo, storeFile: string): boolean {
  const fresh = `${file}.${info.token}`;
  try {
    writeFileSync(fresh, JSON.stringify(info), { flag: 'wx' });
  } catch (e) {
    throw new UserError(`cannot write the run lock: ${(e as Error).message}.`, { file: storeFile });
  }
  try {
    linkSync(fresh, file);
    return true;
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'EEXIST') return false;
    throw new UserError(`cannot write the run lock: ${(e as Error).message}.`, { file: storeFile });
  } finally {
    try {
      unlinkSync(fresh);
    } catch {
      // Already gone: nothing to tidy.
    }
  }
}

const sameLock = (a: LockInfo | 'unreadable' | undefined, b: LockInfo | 'unreadable'): boolean => JSON.stringify(a) === JSON.stringify(b);

/**
 * Remove a dead holder's lock `seen`, under the takeover lock, if it is still
 * the one there. The takeover lock is held for two file operations; one left
 * by a process killed inside them is itself taken over when its holder is dead.
 */
function removeStale(lockFile: string, seen: LockInfo | 'unreadable', me: LockInfo, storeFile: string): void {
  const takeover = `${lockFile}.takeover`;
  if (!createWhole(takeover, me, storeFile)) {
    const other = readLock(takeover);
    if (other !== undefined && (other === 'unreadable' || !alive(other.pid))) {
      try {
        unlinkSync(takeover);
      } catch (e) {
        if (!missing(e)) throw e;
      }
    }
    return;
  }
  try {
    if (sameLock(readLock(lockFile), seen)) unlinkSync(lockFile);
  } catch (e) {
    if (!missing(e)) throw e;
  } finally {
    if (sameLock(readLock(takeover), me)) unlinkSync(takeover);
  }
}

/** Take the lock of a store; returns the function that releases it. */
export function acquireRunLock(storeFile: string): () => void {
  const lockFile = `${storeFile}.running`;
  const mine: LockInfo = { pid: process.pid, host: hostname(), started: new Date().toISOString(), token: randomBytes(12).toString('hex') };
  for (let attempt = 0; attempt < ATTEMPTS; attempt++) {
    if (createWhole(lockFile, mine, storeFile)) {
      return () => {
        // Only our own lock: a lock another run took after ours was taken over is theirs.
        if (sameLock(readLock(lockFile), mine)) {
          try {
            unlinkSync(lockFile);
          } catch (e) {
            if (!missing(e)) throw e;
          }
        }
      };
    }
    const other = readLock(lockFile);
    if (other === undefined) continue;
    if (other !== 'unreadable' && other.host !== mine.host) {
      throw new UserError(`a grid run on host ${other.host} (process ${other.pid}, started ${other.started}) holds this store. Wait for it; if that run is gone, delete ${lockFile}.`, { file: storeFile });
    }
    if (other !== 'unreadable' && alive(other.pid)) {
      throw new UserError(`another hoarfrost grid (process ${other.pid}, started ${other.started}) is computing into this store. Wait for it to finish or stop it, then run again.`, { file: storeFile });
    }
    removeStale(lockFile, other, { ...mine, token: `${mine.token}-takeover` }, storeFile);
  }
  throw new UserError(`cannot take the run lock ${lockFile}; another run keeps taking it.`, { file: storeFile });
}

/**
 * The run holding a store's lock, if it may still be computing: a live
 * process on this host, or any process on another host (whose life cannot
 * be checked from here). A lock left by a killed process here is no holder.
 */
export function runLockHolder(storeFile: string): LockInfo | undefined {
  let other: LockInfo;
  try {
    other = JSON.parse(readFileSync(`${storeFile}.running`, 'utf8')) as LockInfo;
  } catch {
    return undefined;
  }
  return other.host !== hostname() || alive(other.pid) ? other : undefined;
}
