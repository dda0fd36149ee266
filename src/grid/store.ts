/**
 * The model store: one SQLite file (better-sqlite3) per grid run or shard.
 *
 * Tables:
 *   meta(key, value)            grid hash, species, output times, shard, encoding, track axes
 *   grid_points(id, idx, hash)  the points of the current grid (or shard) and their model hashes
 *   models(...)                 one row per computed model: the id, its content hash, status,
 *                               failure reason, every condition as a REAL column, the track
 *                               parameters on grid axes (track_<name>, NULL otherwise), conservation
 *                               drift, solver statistics, wall time and the abundances BLOB
 *
 * Abundances are stored as Float64, little-endian, row-major [time][species]
 * in the species order of meta.species: exactly the doubles the solver
 * produced, so reruns, shards and merges can be compared bit for bit, and
 * the fit, which works in log10, loses nothing to a conversion. Float32
 * would halve the file but round every value at the 1e-7 level.
 *
 * Crash safety: WAL journal and one transaction per batch of results, so a
 * kill at any moment loses only results not yet committed and never leaves
 * a half-written row; SQLite recovers the WAL on the next open.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, statSync } from 'node:fs';
import { endianness } from 'node:os';
import { dirname } from 'node:path';
import Database from 'better-sqlite3';
import { CONDITION_NAMES, type PhysicalConditions } from '../config/conditions.ts';
import { UserError } from '../config/errors.ts';
import { TRACK_PARAMETER_NAMES, type TrackParameterName } from '../config/sections/track.ts';
import type { ModelStats } from '../model/types.ts';

export const STORE_FORMAT = '1';
export const ABUNDANCE_ENCODING = 'float64le';
/** How long a reader or writer waits for a lock held by another process, ms. */
const BUSY_TIMEOUT_MS = 10_000;
const LITTLE_ENDIAN = endianness() === 'LE';

export type ModelStatus = 'ok' | 'failed';

export interface StoredModel {
  id: string;
  hash: string;
  conditions: PhysicalConditions;
  /** Values of the physical track's parameters that are grid axes. */
  trackParameters?: Partial<Record<TrackParameterName, number>>;
  status: ModelStatus;
  failure?: string;
  conservationDrift?: number;
  conservationWorst?: string;
  stats?: ModelStats;
  wallMs?: number;
  clampNotes?: string[];
  /** Row-major [time][species], in the store's species order; absent when the model produced none. */
  abundances?: Float64Array;
}

export interface GridMembership {
  gridHash: string;
  species: readonly string[];
  timesYr: Float64Array;
  points: readonly { id: string; hash: string; index: number }[];
  /** 'K/N' for a shard store, '' for a whole grid. */
  shard: string;
  toolVersion: string;
  networkHash: string;
  /** Track parameters that are grid axes. */
  trackAxes?: readonly TrackParameterName[];
}

export interface StoreMeta {
  format: string;
  gridHash: string;
  species: string[];
  timesYr: Float64Array;
  shard: string;
  toolVersion: string;
  networkHash: string;
  /** Track parameters that are grid axes (stored as track_<name> columns); empty for stores made before. */
  trackAxes: TrackParameterName[];
}

/** The track parameters on grid axes of a list of points: those the points carry. */
export function trackAxesOf(points: readonly { trackParameters?: Partial<Record<TrackParameterName, number>> }[]): TrackParameterName[] {
  const names = new Set<TrackParameterName>();
  for (const p of points) for (const n of Object.keys(p.trackParameters ?? {})) names.add(n as TrackParameterName);
  return TRACK_PARAMETER_NAMES.filter((n) => names.has(n));
}

/** The store column of a track parameter. */
export function trackColumn(name: TrackParameterName): string {
  return `track_${name}`;
}

export interface ExistingModel {
  hash: string;
  status: ModelStatus;
  failure: string | null;
}

export interface OpenOptions {
  readonly?: boolean;
  /**
   * Exclusive locking: the WAL index lives in process memory rather than a
   * shared-memory file, which keeps WAL safe on cluster network file systems
   * (used for shard stores, which one process owns).
   */
  exclusive?: boolean;
}

const STAT_COLUMNS = ['steps', 'failed_steps', 'rhs_evals', 'jacobian_evals', 'factorizations', 'newton_failures'] as const;
const STAT_FIELDS: Record<(typeof STAT_COLUMNS)[number], keyof ModelStats> = {
  steps: 'steps',
  failed_steps: 'failedSteps',
  rhs_evals: 'rhsEvals',
  jacobian_evals: 'jacobianEvals',
  factorizations: 'factorizations',
  newton_failures: 'newtonFailures',
};

/** Abundances as the BLOB stored: little-endian doubles. */
export function encodeAbundances(a: Float64Array): Buffer {
  const b = Buffer.from(a.buffer, a.byteOffset, a.byteLength);
  return LITTLE_ENDIAN ? b : Buffer.from(b).swap64();
}

export function decodeAbundances(b: Buffer): Float64Array {
  const out = new Float64Array(b.byteLength / 8);
  for (let i = 0; i < out.length; i++) out[i] = b.readDoubleLE(i * 8);
  return out;
}

export class ModelStore {
  readonly file: string;
  readonly db: Database.Database;
  private insert?: Database.Statement;

  private constructor(file: string, db: Database.Database) {
    this.file = file;
    this.db = db;
  }

  static open(file: string, options: OpenOptions = {}): ModelStore {
    let db: Database.Database;
    if (existsSync(file) && statSync(file).isDirectory()) throw new UserError('expected a model store file (.sqlite), found a folder. Give the store file, or move the folder away.', { file });
    try {
      if (!options.readonly) mkdirSync(dirname(file), { recursive: true });
      db = new Database(file, { readonly: options.readonly ?? false, fileMustExist: options.readonly ?? false, timeout: BUSY_TIMEOUT_MS });
    } catch (e) {
      if (options.readonly) throw new UserError(`no model store here (${(e as Error).message}). Run \`hoarfrost grid\` on the pipeline first.`, { file });
      throw new UserError(`cannot open the model store: ${(e as Error).message}.`, { file });
    }
    const store = new ModelStore(file, db);
    try {
      if (options.exclusive && !options.readonly) db.pragma('locking_mode = EXCLUSIVE');
      if (!options.readonly) {
        db.pragma('journal_mode = WAL');
        // NORMAL in WAL mode: durable against a killed process, never corrupt; a power cut may drop the last commits.
        db.pragma('synchronous = NORMAL');
        store.createSchema();
      } else {
        store.checkFormat();
      }
    } catch (e) {
      db.close();
      if (e instanceof UserError) throw e;
      if ((e as { code?: string }).code === 'SQLITE_BUSY') {
        throw new UserError('the model store is locked by a grid that is still running; wait for it to finish (or stop it) and try again.', { file });
      }
      throw new UserError(`not a readable model store: ${(e as Error).message}. Delete the file to start the grid afresh.`, { file });
    }
    return store;
  }

  private createSchema(): void {
    const db = this.db;
    db.exec(`CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
      CREATE TABLE IF NOT EXISTS grid_points (id TEXT PRIMARY KEY, idx INTEGER NOT NULL, hash TEXT NOT NULL);
      CREATE TABLE IF NOT EXISTS models (
        id TEXT PRIMARY KEY, hash TEXT NOT NULL, status TEXT NOT NULL CHECK (status IN ('ok', 'failed')), failure TEXT,
        conservation_drift REAL, conservation_worst TEXT,
        ${STAT_COLUMNS.map((c) => `${c} INTEGER`).join(', ')},
        wall_ms REAL, clamp_notes TEXT, n_times INTEGER, n_species INTEGER, abundances BLOB,
        run TEXT NOT NULL, computed_at TEXT NOT NULL);`);
    const present = new Set((db.prepare('PRAGMA table_info(models)').all() as { name: string }[]).map((r) => r.name));
    // Condition columns are added by name, so a store made before a condition existed gains it.
    for (const name of CONDITION_NAMES) if (!present.has(name)) db.exec(`ALTER TABLE models ADD COLUMN ${name} REAL`);
    // Track parameters on grid axes, named track_<parameter>; NULL where the parameter is not an axis.
    for (const name of TRACK_PARAMETER_NAMES) if (!present.has(trackColumn(name))) db.exec(`ALTER TABLE models ADD COLUMN ${trackColumn(name)} REAL`);
    const format = this.metaValue('format');
    if (format === undefined) this.db.prepare('INSERT INTO meta (key, value) VALUES (?, ?)').run('format', STORE_FORMAT);
    else if (format !== STORE_FORMAT) throw new UserError(`the model store has format ${format}, this tool writes format ${STORE_FORMAT}. Move it aside and rerun the grid.`, { file: this.file });
  }

  private checkFormat(): void {
    const format = this.metaValue('format');
    if (format !== STORE_FORMAT) throw new UserError(format === undefined ? 'not a model store (no format entry).' : `the model store has format ${format}; this tool reads format ${STORE_FORMAT}.`, { file: this.file });
  }

  private metaValue(key: string): string | undefined {
    const row = this.db.prepare('SELECT value FROM meta WHERE key = ?').get(key) as { value: string } | undefined;
    return row?.value;
  }

  /** Record the grid (or shard) this store now serves; rows of other points stay but are no longer part of it. */
  setGrid(m: GridMembership): void {
    const setMeta = this.db.prepare('INSERT OR REPLACE INTO meta (key, value) VALUES (?, ?)');
    const addPoint = this.db.prepare('INSERT INTO grid_points (id, idx, hash) VALUES (?, ?, ?)');
    this.db.transaction(() => {
      setMeta.run('grid_hash', m.gridHash);
      setMeta.run('species', JSON.stringify(m.species));
      setMeta.run('times_yr', JSON.stringify(Array.from(m.timesYr)));
      setMeta.run('abundance_encoding', ABUNDANCE_ENCODING);
      setMeta.run('shard', m.shard);
      setMeta.run('tool_version', m.toolVersion);
      setMeta.run('network_hash', m.networkHash);
      setMeta.run('track_axes', JSON.stringify(m.trackAxes ?? []));
      this.db.exec('DELETE FROM grid_points');
      for (const p of m.points) addPoint.run(p.id, p.index, p.hash);
    })();
  }

  meta(): StoreMeta | undefined {
    const rows = this.db.prepare('SELECT key, value FROM meta').all() as { key: string; value: string }[];
    const m = new Map(rows.map((r) => [r.key, r.value]));
    if (!m.has('grid_hash')) return undefined;
    return {
      format: m.get('format') ?? '',
      gridHash: m.get('grid_hash')!,
      species: JSON.parse(m.get('species') ?? '[]') as string[],
      timesYr: Float64Array.from(JSON.parse(m.get('times_yr') ?? '[]') as number[]),
      shard: m.get('shard') ?? '',
      toolVersion: m.get('tool_version') ?? '',
      networkHash: m.get('network_hash') ?? '',
      trackAxes: (JSON.parse(m.get('track_axes') ?? '[]') as string[]).filter((n): n is TrackParameterName => (TRACK_PARAMETER_NAMES as string[]).includes(n)),
    };
  }

  existing(): Map<string, ExistingModel> {
    const out = new Map<string, ExistingModel>();
    for (const r of this.db.prepare('SELECT id, hash, status, failure FROM models').iterate() as Iterable<{ id: string } & ExistingModel>) {
      out.set(r.id, { hash: r.hash, status: r.status, failure: r.failure });
    }
    return out;
  }

  /** Write a batch of results in one transaction. */
  write(models: readonly StoredModel[], run: string): void {
    if (models.length === 0) return;
    if (!this.insert) {
      const cols = ['id', 'hash', 'status', 'failure', 'conservation_drift', 'conservation_worst', ...STAT_COLUMNS, 'wall_ms', 'clamp_notes', 'n_times', 'n_species', 'abundances', 'run', 'computed_at', ...CONDITION_NAMES, ...TRACK_PARAMETER_NAMES.map(trackColumn)];
      this.insert = this.db.prepare(`INSERT OR REPLACE INTO models (${cols.join(', ')}) VALUES (${cols.map(() => '?').join(', ')})`);
    }
    const meta = this.meta();
    const nSpecies = meta?.species.length ?? 0;
    const nTimes = meta?.timesYr.length ?? 0;
    const insert = this.insert;
    const now = new Date().toISOString();
    this.db.transaction(() => {
      for (const m of models) {
        insert.run(
          m.id,
          m.hash,
          m.status,
          m.failure ?? null,
          m.conservationDrift ?? null,
          m.conservationWorst ?? null,
          ...STAT_COLUMNS.map((c) => (m.stats ? m.stats[STAT_FIELDS[c]] : null)),
          m.wallMs ?? null,
          m.clampNotes && m.clampNotes.length > 0 ? JSON.stringify(m.clampNotes) : null,
          m.abundances ? nTimes : null,
          m.abundances ? nSpecies : null,
          m.abundances ? encodeAbundances(m.abundances) : null,
          run,
          now,
          ...CONDITION_NAMES.map((n) => m.conditions[n]),
          ...TRACK_PARAMETER_NAMES.map((n) => m.trackParameters?.[n] ?? null),
        );
      }
    })();
  }

  /** Copy the rows of the given ids from another store file into this one, in one transaction. */
  copyFrom(otherFile: string, ids: readonly string[]): void {
    if (ids.length === 0) return;
    this.db.prepare('ATTACH DATABASE ? AS other').run(otherFile);
    try {
      const cols = (this.db.prepare('PRAGMA table_info(models)').all() as { name: string }[]).map((r) => r.name);
      const otherCols = new Set((this.db.prepare('PRAGMA other.table_info(models)').all() as { name: string }[]).map((r) => r.name));
      const shared = cols.filter((c) => otherCols.has(c));
      const copy = this.db.prepare(`INSERT OR REPLACE INTO main.models (${shared.join(', ')}) SELECT ${shared.join(', ')} FROM other.models WHERE id = ?`);
      this.db.transaction(() => {
        for (const id of ids) copy.run(id);
      })();
    } finally {
      this.db.exec('DETACH DATABASE other');
    }
  }

  /** Finished models (status ok, current hash) of the store's grid. */
  finishedCount(): number {
    return (this.db.prepare(`SELECT COUNT(*) AS n FROM grid_points g JOIN models m ON m.id = g.id AND m.hash = g.hash WHERE m.status = 'ok'`).get() as { n: number }).n;
  }

  /**
   * The finished models of the store's grid in grid order, as raw rows:
   * id, n_times, n_species, abundances BLOB, then every condition in
   * CONDITION_NAMES order, then the given track parameters (no object per row: the fit's query reads many).
   */
  finishedRows(trackAxes: readonly TrackParameterName[] = []): Iterable<unknown[]> {
    return this.db
      .prepare(`SELECT m.id, m.n_times, m.n_species, m.abundances, ${[...CONDITION_NAMES, ...trackAxes.map(trackColumn)].map((c) => `m.${c}`).join(', ')}
        FROM grid_points g JOIN models m ON m.id = g.id AND m.hash = g.hash WHERE m.status = 'ok' ORDER BY g.idx`)
      .raw(true)
      .iterate() as Iterable<unknown[]>;
  }

  /**
   * A hash of what the store holds for its current grid: the grid hash, every
   * point's id, model hash and status, and every stored abundance value, in
   * grid order. Two stores with the same results hash alike whatever order
   * they were written in (the bytes of an SQLite file depend on write order).
   */
  contentHash(): string {
    const h = createHash('sha256').update(this.meta()?.gridHash ?? '');
    const rows = this.db.prepare(`SELECT g.id, m.hash, m.status, m.failure, m.abundances FROM grid_points g LEFT JOIN models m ON m.id = g.id AND m.hash = g.hash ORDER BY g.idx`).raw(true);
    for (const r of rows.iterate() as Iterable<[string, string | null, string | null, string | null, Buffer | null]>) {
      h.update(`\n${r[0]} ${r[1] ?? '-'} ${r[2] ?? 'missing'} ${r[3] ?? ''}\n`);
      if (r[4]) h.update(r[4]);
    }
    return h.digest('hex');
  }

  integrityCheck(): string {
    return (this.db.pragma('integrity_check', { simple: true }) as string) ?? '';
  }

  close(): void {
    this.db.close();
  }
}

/** The content hash (ModelStore.contentHash) of a store file. */
export function storeContentHash(storeFile: string): string {
  const store = ModelStore.open(storeFile, { readonly: true });
  try {
    return store.contentHash();
  } finally {
    store.close();
  }
}
