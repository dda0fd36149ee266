/**
 * Lock files for a survey's CI: `--lock FILE` records a run's best fits,
 * their intervals and the hashes of its tables; `--check FILE` compares a new
 * run with it and lists every sightline whose fit moved by more than the
 * tolerance stated in the lock file (dex, for density and for age), so a
 * change of rates or observations that changes the paper's numbers is caught.
 */
import { existsSync, readFileSync, statSync } from 'node:fs';
import { writeOutput } from '../config/write.ts';
import { dirname, resolve } from 'node:path';
import { UserError } from '../config/errors.ts';
import { decodeText } from '../config/yaml.ts';
import { TOOL_VERSION } from '../config/version.ts';
import { canonicalJson } from './hash.ts';

const LOCK_FORMAT = 'hoarfrost-lock';
const LOCK_VERSION = 1;

/**
 * Default tolerance, dex, when the fit states no grid step: a tenth of a
 * decade. With a grid step known (fit.json gridStepsDex), the default is
 * TOLERANCE_GRID_STEPS steps of that parameter's grid, so that a move by one
 * grid step passes and one by two fails (the rule stated in the lock file).
 */
export const DEFAULT_DENSITY_TOLERANCE_DEX = 0.1;
export const DEFAULT_AGE_TOLERANCE_DEX = 0.1;
export const TOLERANCE_GRID_STEPS = 1.5;

/** The default tolerance of a parameter with grid step `stepDex` (dex), or the fixed default without one. */
export function defaultToleranceDex(stepDex: number | undefined, fallback: number): number {
  return stepDex !== undefined && stepDex > 0 ? Number((TOLERANCE_GRID_STEPS * stepDex).toPrecision(3)) : fallback;
}

/** The locked values of one sightline's fit: best value and 68.3% interval, density in cm^-3, age in yr. */
export interface LockedFit {
  sightline: string;
  density: number;
  densityLo: number;
  densityHi: number;
  ageYr: number;
  ageLoYr: number;
  ageHiYr: number;
  chi2: number;
  /** Every fitted parameter (grid conditions and age_yr): best value and 68.3% interval (absent in version-1 lock files written before it). */
  parameters?: Record<string, { best: number; lo: number; hi: number }>;
}

export interface LockTolerance {
  densityDex: number;
  ageDex: number;
  /** Tolerance of each other fitted parameter, dex (default: TOLERANCE_GRID_STEPS of its grid step). */
  parametersDex?: Record<string, number>;
  /** The rule the defaults followed, for a reader of the lock file. */
  rule?: string;
}

export interface LockFile {
  format: typeof LOCK_FORMAT;
  version: number;
  tool: string;
  pipeline: string;
  tolerance: LockTolerance;
  /** sha256 of each table the run wrote, keyed by its path in the output folder. */
  tables: Record<string, string>;
  sightlines: LockedFit[];
}

export function buildLock(pipelineName: string, fits: readonly LockedFit[], tables: Readonly<Record<string, string>>, tolerance: LockTolerance): LockFile {
  const sortedTables: Record<string, string> = {};
  for (const k of Object.keys(tables).sort()) sortedTables[k] = tables[k];
  return {
    format: LOCK_FORMAT,
    version: LOCK_VERSION,
    tool: TOOL_VERSION,
    pipeline: pipelineName,
    tolerance,
    tables: sortedTables,
    sightlines: [...fits].sort((a, b) => (a.sightline < b.sightline ? -1 : a.sightline > b.sightline ? 1 : 0)),
  };
}

/** Written with a fixed key order and no timestamp, so the same run writes the same lock file. */
export function writeLock(file: string, lock: LockFile): void {
  writeOutput(file, `${JSON.stringify(JSON.parse(canonicalJson(lock)), null, 2)}\n`);
}

/** Refuse a --lock path that cannot be written (a folder, or in a folder that does not exist) before the run, not after it. */
export function checkLockTarget(file: string): void {
  if (existsSync(file) && statSync(file).isDirectory()) throw new UserError('--lock needs a file name, and this is a folder. Give a file such as results.lock.json.', { file });
  const dir = dirname(resolve(file));
  if (!existsSync(dir) || !statSync(dir).isDirectory()) throw new UserError(`--lock: the folder ${dir} does not exist. Make it first, or give a lock file in an existing folder.`, { file });
}

export function readLock(file: string): LockFile {
  if (existsSync(file) && statSync(file).isDirectory()) throw new UserError('expected a lock file, found a folder. Give the file written by --lock.', { file });
  let text: string;
  try {
    text = decodeText(readFileSync(file), file, 'lock file');
  } catch (e) {
    if (e instanceof UserError) throw e;
    throw new UserError('lock file not found. Write one first with `hoarfrost run PIPELINE --lock FILE`.', { file });
  }
  let doc: LockFile;
  try {
    doc = JSON.parse(text) as LockFile;
  } catch (e) {
    throw new UserError(`the lock file is not valid JSON (${(e as Error).message}). Write it again with --lock.`, { file });
  }
  if (doc?.format !== LOCK_FORMAT || doc.version !== LOCK_VERSION) {
    throw new UserError(`not a hoarfrost lock file (expected "format": "${LOCK_FORMAT}", version ${LOCK_VERSION}). Write it again with --lock.`, { file });
  }
  const tol = doc.tolerance;
  if (!tol || !(tol.densityDex >= 0) || !(tol.ageDex >= 0)) {
    throw new UserError('field "tolerance" must give "densityDex" and "ageDex", each a number of dex at least 0.', { file, field: 'tolerance' });
  }
  if (!Array.isArray(doc.sightlines)) throw new UserError('field "sightlines" must be a list of fits.', { file, field: 'sightlines' });
  for (const [i, s] of doc.sightlines.entries()) {
    for (const key of ['density', 'densityLo', 'densityHi', 'ageYr', 'ageLoYr', 'ageHiYr'] as const) {
      if (typeof s?.[key] !== 'number' || !(s[key] > 0)) {
        throw new UserError(`must be a positive number, found ${JSON.stringify(s?.[key])}.`, { file, field: `sightlines[${i}].${key}` });
      }
    }
    if (typeof s.sightline !== 'string') throw new UserError('must be the sightline name.', { file, field: `sightlines[${i}].sightline` });
  }
  return doc;
}

export interface LockDifference {
  sightline: string;
  /** Sentences: what moved and by how much. */
  changes: string[];
}

export interface LockComparison {
  tolerance: LockTolerance;
  /** Sightlines whose fit moved beyond the tolerance, or that appeared or disappeared. */
  moved: LockDifference[];
  /** Tables whose bytes changed (informative: a table can change without a fit moving). */
  changedTables: string[];
  passed: boolean;
}

const FIELDS: { key: keyof LockedFit; label: string; unit: string; kind: 'density' | 'age' }[] = [
  { key: 'density', label: 'best density', unit: 'cm^-3', kind: 'density' },
  { key: 'densityLo', label: 'density 68.3% lower bound', unit: 'cm^-3', kind: 'density' },
  { key: 'densityHi', label: 'density 68.3% upper bound', unit: 'cm^-3', kind: 'density' },
  { key: 'ageYr', label: 'best age', unit: 'yr', kind: 'age' },
  { key: 'ageLoYr', label: 'age 68.3% lower bound', unit: 'yr', kind: 'age' },
  { key: 'ageHiYr', label: 'age 68.3% upper bound', unit: 'yr', kind: 'age' },
];

/** Compare a run's fits with a lock; `tolerance` overrides the lock's own when given. */
export function compareWithLock(lock: LockFile, fits: readonly LockedFit[], tables: Readonly<Record<string, string>>, tolerance: Partial<LockTolerance> = {}): LockComparison {
  const tol: LockTolerance = {
    densityDex: tolerance.densityDex ?? lock.tolerance.densityDex,
    ageDex: tolerance.ageDex ?? lock.tolerance.ageDex,
    ...(lock.tolerance.parametersDex ? { parametersDex: { ...lock.tolerance.parametersDex, ...tolerance.parametersDex } } : {}),
  };
  const current = new Map(fits.map((f) => [f.sightline, f]));
  const locked = new Map(lock.sightlines.map((f) => [f.sightline, f]));
  const moved: LockDifference[] = [];
  for (const old of lock.sightlines) {
    const now = current.get(old.sightline);
    if (!now) {
      moved.push({ sightline: old.sightline, changes: ['is in the lock file but has no fit in this run'] });
      continue;
    }
    const changes: string[] = [];
    for (const f of FIELDS) {
      const a = old[f.key] as number;
      const b = now[f.key] as number;
      const dex = Math.abs(Math.log10(b) - Math.log10(a));
      const limit = f.kind === 'density' ? tol.densityDex : tol.ageDex;
      if (!(dex <= limit)) changes.push(`${f.label} moved ${dex.toFixed(3)} dex (> ${limit} dex): ${formatValue(a)} -> ${formatValue(b)} ${f.unit}`);
    }
    for (const [name, was] of Object.entries(old.parameters ?? {})) {
      if (name === 'density' || name === 'age_yr') continue;
      const is = now.parameters?.[name];
      if (is === undefined) {
        changes.push(`${name} is no longer fitted`);
        continue;
      }
      const limit = tol.parametersDex?.[name] ?? DEFAULT_DENSITY_TOLERANCE_DEX;
      for (const key of ['best', 'lo', 'hi'] as const) {
        const dex = Math.abs(Math.log10(is[key]) - Math.log10(was[key]));
        const label = key === 'best' ? `best ${name}` : `${name} 68.3% ${key === 'lo' ? 'lower' : 'upper'} bound`;
        if (!(dex <= limit)) changes.push(`${label} moved ${dex.toFixed(3)} dex (> ${limit} dex): ${formatValue(was[key])} -> ${formatValue(is[key])}`);
      }
    }
    if (changes.length > 0) moved.push({ sightline: old.sightline, changes });
  }
  for (const f of fits) {
    if (!locked.has(f.sightline)) moved.push({ sightline: f.sightline, changes: ['has a fit in this run but is not in the lock file'] });
  }
  const changedTables: string[] = [];
  const names = new Set([...Object.keys(lock.tables ?? {}), ...Object.keys(tables)]);
  for (const name of [...names].sort()) {
    if (lock.tables?.[name] !== tables[name]) changedTables.push(name);
  }
  return { tolerance: tol, moved, changedTables, passed: moved.length === 0 };
}

function formatValue(v: number): string {
  return v.toPrecision(3);
}

export function formatComparison(c: LockComparison, lockFile: string): string {
  const lines: string[] = [];
  if (c.passed) {
    lines.push(`check against ${lockFile}: passed; every fit within ${c.tolerance.densityDex} dex in density and ${c.tolerance.ageDex} dex in age.`);
  } else {
    lines.push(`check against ${lockFile}: FAILED; ${c.moved.length} sightline${c.moved.length === 1 ? '' : 's'} moved beyond ${c.tolerance.densityDex} dex in density or ${c.tolerance.ageDex} dex in age:`);
    for (const m of c.moved) for (const ch of m.changes) lines.push(`  ${m.sightline}: ${ch}`);
  }
  if (c.changedTables.length > 0) lines.push(`tables whose bytes changed: ${c.changedTables.join(', ')}`);
  return lines.join('\n');
}
