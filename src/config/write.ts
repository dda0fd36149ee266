/**
 * Every output file is written here. The data go to a fresh temporary file
 * beside the target (created exclusively, so a planted file or symlink of
 * that name is never opened) and are renamed over the target: a symlink
 * planted at the output path is replaced, never followed, and a reader sees
 * the old file or the new one, never half of one. On failure the temporary
 * file is removed and the error names the path; what the machine refused
 * (a full disk, a read-only disk, no permission) is a UserError, exit 2.
 */
import { randomBytes } from 'node:crypto';
import { renameSync, unlinkSync, writeFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { UserError } from './errors.ts';

const REFUSALS: Record<string, string> = {
  ENOSPC: 'the disk is full. Free some space, or choose an output folder on another disk',
  EDQUOT: 'the disk quota is used up. Free some space, or choose an output folder on another disk',
  EROFS: 'the file system is read-only. Choose an output folder on a writable disk',
  EACCES: 'permission denied. Check that you may write there, or choose another output folder',
  EPERM: 'operation not permitted. Check that you may write there, or choose another output folder',
  ENOTDIR: 'a part of this path is a file, not a folder. Choose another path, or move the file away',
  EISDIR: 'a folder has this name. Choose another output path, or move the folder away',
  ENOENT: 'its folder does not exist (or was removed while writing)',
};

/** A write error as a UserError naming the file (with `more` said after), when the machine refused it; undefined for anything else. */
export function writeRefusal(file: string, e: unknown, more = ''): UserError | undefined {
  const code = (e as NodeJS.ErrnoException | undefined)?.code;
  const sqliteFull = (e as { code?: string } | undefined)?.code === 'SQLITE_FULL';
  const advice = sqliteFull ? REFUSALS.ENOSPC : code !== undefined ? REFUSALS[code] : undefined;
  return advice === undefined ? undefined : new UserError(`cannot write: ${advice}.${more ? ` ${more}` : ''}`, { file });
}

/** Write a whole output file through a temporary file and a rename (see the top of this file). */
export function writeOutput(file: string, data: string | Uint8Array, options: { mode?: number } = {}): void {
  const tmp = join(dirname(file), `.${basename(file)}.${process.pid}.${randomBytes(6).toString('hex')}.tmp`);
  try {
    writeFileSync(tmp, data, { flag: 'wx', mode: options.mode });
    renameSync(tmp, file);
  } catch (e) {
    try {
      unlinkSync(tmp);
    } catch {
      // Never created, or already renamed: nothing to remove.
    }
    throw writeRefusal(file, e) ?? e;
  }
}
