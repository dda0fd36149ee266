/**
 * The record of finished stages, OUT/.hoarfrost/stages.json: per stage the
 * hash of its inputs, the hash of its outputs and the files it wrote. A stage
 * whose record matches is skipped. The file is replaced atomically (write to
 * a temporary file, then rename) so an interrupted run never leaves half a
 * record; a stage that fails loses its record and runs again next time.
 */
import { mkdirSync, readFileSync } from 'node:fs';
import { writeOutput } from '../config/write.ts';
import { dirname, join } from 'node:path';
import { UserError } from '../config/errors.ts';
import { STAGE_NAMES, isStageName, type StageName } from './stages.ts';

export const STATE_DIR = '.hoarfrost';
export const STATE_FILE = 'stages.json';
const STATE_FORMAT = 'hoarfrost-stages';
const STATE_VERSION = 1;

export interface StageRecord {
  inputHash: string;
  outputHash: string;
  outputs: string[];
  summary: string;
  /** ISO time the stage finished (kept here and in the provenance, never in tables). */
  finishedAt: string;
  seconds: number;
}

export type StageState = Partial<Record<StageName, StageRecord>>;

export function statePath(outDir: string): string {
  return join(outDir, STATE_DIR, STATE_FILE);
}

export function readState(outDir: string): StageState {
  const file = statePath(outDir);
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch {
    return {};
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch {
    throw new UserError(`the stage record is not valid JSON. Delete it to rerun every stage.`, { file });
  }
  const doc = parsed as { format?: unknown; version?: unknown; stages?: Record<string, StageRecord> };
  if (doc?.format !== STATE_FORMAT || doc.version !== STATE_VERSION || typeof doc.stages !== 'object' || doc.stages === null) {
    throw new UserError(`not a stage record of this version of hoarfrost. Delete it to rerun every stage.`, { file });
  }
  const state: StageState = {};
  for (const [name, rec] of Object.entries(doc.stages)) {
    if (isStageName(name) && typeof rec?.inputHash === 'string' && typeof rec.outputHash === 'string' && Array.isArray(rec.outputs)) state[name] = rec;
  }
  return state;
}

export function writeState(outDir: string, state: StageState): void {
  const file = statePath(outDir);
  mkdirSync(dirname(file), { recursive: true });
  const stages: Record<string, StageRecord> = {};
  for (const name of STAGE_NAMES) {
    const rec = state[name];
    if (rec) stages[name] = rec;
  }
  writeOutput(file, `${JSON.stringify({ format: STATE_FORMAT, version: STATE_VERSION, stages }, null, 2)}\n`);
}
