/**
 * OUT/provenance.json: what it takes to reproduce a run's figures and tables
 * exactly. Timestamps and absolute paths live here (and in the stage record),
 * never inside a table, so tables stay byte-identical between clones.
 */
import { mkdirSync } from 'node:fs';
import { writeOutput } from '../config/write.ts';
import { join, relative } from 'node:path';
import type { Pipeline } from '../config/pipeline.ts';
import { TOOL_VERSION } from '../config/version.ts';
import { hashFile } from './hash.ts';
import type { RunResult } from './runner.ts';

export const PROVENANCE_FILE = 'provenance.json';

export interface Provenance {
  tool: { name: 'hoarfrost'; version: string };
  node: string;
  platform: string;
  commandLine: string[];
  startedAt: string;
  finishedAt: string;
  pipeline: { name: string; file: string; sha256: string };
  network: { file: string; sha256: string };
  /** Content hash of the model store (every model's content hash and status), from the grid stage. */
  store?: string;
  stages: Record<string, { status: string; seconds: number; inputHash?: string; outputHash?: string; outputs: string[] }>;
}

export function buildProvenance(pipeline: Pipeline, run: RunResult, commandLine: string[]): Provenance {
  const networkFile = pipeline.resolvePath(pipeline.config.network);
  const stages: Provenance['stages'] = {};
  for (const s of run.stages) stages[s.name] = { status: s.status, seconds: Number(s.seconds.toFixed(3)), inputHash: s.inputHash, outputHash: s.outputHash, outputs: s.outputs };
  return {
    tool: { name: 'hoarfrost', version: TOOL_VERSION },
    node: process.version,
    platform: `${process.platform}-${process.arch}`,
    commandLine,
    startedAt: run.startedAt,
    finishedAt: run.finishedAt,
    pipeline: { name: pipeline.config.name, file: pipeline.file, sha256: hashFile(pipeline.file) ?? 'missing' },
    network: { file: relative(pipeline.dir, networkFile) || networkFile, sha256: hashFile(networkFile) ?? 'missing' },
    store: run.state.grid?.outputHash,
    stages,
  };
}

export function writeProvenance(outDir: string, provenance: Provenance): string {
  mkdirSync(outDir, { recursive: true });
  const file = join(outDir, PROVENANCE_FILE);
  writeOutput(file, `${JSON.stringify(provenance, null, 2)}\n`);
  return file;
}
