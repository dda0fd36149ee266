/**
 * The one output writer: a symlink planted at the output path is replaced,
 * not followed; a failing write leaves no temporary file and names the path
 * in a UserError (exit 2) for a full disk, a read-only disk or a refused
 * permission. The failures are injected into node:fs: as root (the machine
 * and CI) permissions cannot produce EACCES, and a full disk cannot be made
 * without mounting one.
 */
import * as fs from 'node:fs';
import { mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync, lstatSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';

vi.mock('node:fs', async (importOriginal) => {
  const real = await importOriginal<typeof import('node:fs')>();
  return { ...real, writeFileSync: vi.fn(real.writeFileSync) };
});

const { writeOutput } = await import('../../src/config/write.ts');
const { UserError } = await import('../../src/config/errors.ts');

const dir = mkdtempSync(join(tmpdir(), 'hoarfrost-write-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const real = await vi.importActual<typeof import('node:fs')>('node:fs');

/** The next write creates its file with part of the data, then fails with `code`, as a filling disk does. */
function failWith(code: string): void {
  vi.mocked(fs.writeFileSync).mockImplementationOnce((file, data) => {
    real.writeFileSync(file as string, String(data).slice(0, 1), { flag: 'wx' });
    throw Object.assign(new Error(`${code}: simulated, write '${String(file)}'`), { code, syscall: 'write', path: String(file) });
  });
}

describe('writeOutput', () => {
  it('replaces a symlink planted at the output path instead of writing through it', () => {
    const target = join(dir, 'precious.txt');
    writeFileSync(target, 'keep me\n');
    const out = join(dir, 'best_fits.csv');
    symlinkSync(target, out);
    writeOutput(out, 'a,b\n1,2\n');
    expect(readFileSync(target, 'utf8')).toBe('keep me\n');
    expect(lstatSync(out).isSymbolicLink()).toBe(false);
    expect(readFileSync(out, 'utf8')).toBe('a,b\n1,2\n');
  });

  it.each([
    ['ENOSPC', 'the disk is full'],
    ['EROFS', 'the file system is read-only'],
    ['EACCES', 'permission denied'],
  ])('%s becomes a UserError naming the path, exit 2, and leaves no temporary file', (code, words) => {
    const out = join(dir, `out-${code}.json`);
    failWith(code);
    let caught: unknown;
    try {
      writeOutput(out, '{}\n');
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(UserError);
    expect((caught as Error).message).toContain(`${out}: cannot write: ${words}`);
    expect((caught as InstanceType<typeof UserError>).exitCode).toBe(2);
    expect(readdirSync(dir).filter((f) => f.includes(`out-${code}`))).toEqual([]);
  });
});
