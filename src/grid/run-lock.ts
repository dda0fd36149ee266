/**
 * One grid run per store: a lock file beside the store (STORE.running) names
 * the process computing into it, so a second `hoarfrost grid` on the same
 * pipeline stops with a clear message instead of computing the same models
 * twice. A lock left by a killed process on this host is taken over.
 * Merging takes the same lock. (Shard stores need none: they are opened
 * with SQLite's exclusive locking.)
 */
import { readFileSync, unlinkSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { UserError } from '../config/errors.ts';

export interface LockInfo {
  pid: number;
  host: string;
  started: string;
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** Take the lock of a store; returns the function that releases it. */
export function acquireRunLock(storeFile: string): () => void {
  const lockFile = `${storeFile}.running`;
  const mine: LockInfo = { pid: process.pid, host: hostname(), started: new Date().toISOString() };
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      writeFileSync(lockFile, JSON.stringify(mine), { flag: 'wx' });
      return () => {
        try {
          unlinkSync(lockFile);
        } catch {
          // Already gone: nothing to release.
        }
      };
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw new UserError(`cannot write the run lock: ${(e as Error).message}.`, { file: lockFile });
    }
    let other: LockInfo | undefined;
    try {
      other = JSON.parse(readFileSync(lockFile, 'utf8')) as LockInfo;
    } catch {
      other = undefined; // unreadable: left half-written by a killed process
    }
    if (other && other.host !== mine.host) {
      throw new UserError(`a grid run on host ${other.host} (process ${other.pid}, started ${other.started}) holds this store. Wait for it; if that run is gone, delete ${lockFile}.`, { file: storeFile });
    }
    if (other && alive(other.pid)) {
      throw new UserError(`another hoarfrost grid (process ${other.pid}, started ${other.started}) is computing into this store. Wait for it to finish or stop it, then run again.`, { file: storeFile });
    }
    unlinkSync(lockFile);
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
