/**
 * `hoarfrost run`: load the pipeline, run its stages, write the provenance,
 * and write or check a lock file. Returns the exit code: 0, or 1 when a
 * check found fits that moved. The stage implementations are a parameter
 * (the real ones by default) so the whole command can be tested with fakes.
 */
import { isAbsolute, join, relative } from 'node:path';
import { UserError } from '../config/errors.ts';
import { loadPipeline } from '../config/pipeline.ts';
import { readFitResult, lockedFits, lockTolerance, tableHashes } from './fit-lock.ts';
import { buildLock, checkLockTarget, compareWithLock, formatComparison, readLock, writeLock } from './lock.ts';
import { buildProvenance, PROVENANCE_FILE, writeProvenance } from './provenance.ts';
import { formatStageLine, outputFolder, runStages } from './runner.ts';
import type { StageDataMap, StageName, StageSet } from './stages.ts';

export interface ExecuteOptions {
  pipelineFile: string;
  from?: StageName;
  only?: StageName;
  lock?: string;
  check?: string;
  workers?: number;
  densityToleranceDex?: number;
  ageToleranceDex?: number;
  /** The command as typed, for the provenance. */
  commandLine: string[];
  stdout: NodeJS.WritableStream;
  stderr: NodeJS.WritableStream;
  stages?: StageSet<StageDataMap>;
}

/** A path for the terminal: relative to the working folder when inside it. */
export function displayPath(p: string): string {
  const rel = relative(process.cwd(), p);
  return rel !== '' && !rel.startsWith('..') && !isAbsolute(rel) ? rel : p;
}

export async function executeRun(o: ExecuteOptions): Promise<number> {
  if (o.from && o.only) throw new UserError('give either --from or --only, not both.');
  if (o.lock && o.check) throw new UserError('give either --lock (write a lock file) or --check (compare with one), not both.');
  for (const [flag, v] of [['--density-tolerance', o.densityToleranceDex], ['--age-tolerance', o.ageToleranceDex]] as const) {
    if (v !== undefined && !(v >= 0)) throw new UserError(`${flag} must be a number of dex, 0 or more; found ${v}.`);
  }
  if (o.workers !== undefined && !(Number.isInteger(o.workers) && o.workers >= 1)) throw new UserError(`--workers must be a whole number, 1 or more; found ${o.workers}.`);
  // Read the lock before any work, so a wrong path fails in a second, not after the grid.
  const lock = o.check ? readLock(o.check) : undefined;
  if (o.lock) checkLockTarget(o.lock);

  const pipeline = loadPipeline(o.pipelineFile);
  const outDir = outputFolder(pipeline);
  const stages = o.stages ?? (await import('./default-stages.ts')).defaultStages();
  o.stdout.write(`hoarfrost run ${pipeline.config.name}: output in ${displayPath(outDir)}\n`);
  const run = await runStages(pipeline, stages, {
    from: o.from,
    only: o.only,
    workers: o.workers,
    commandLine: o.commandLine,
    progress: (line) => o.stderr.write(`${line}\n`),
    onStage: (r) => {
      o.stdout.write(`${formatStageLine(r)}\n`);
      for (const w of r.warnings) o.stdout.write(`         warning: ${w}\n`);
    },
  });
  // A run that found every stage up to date writes nothing: the provenance of the run that made the outputs stands.
  const ranAny = run.stages.some((s) => s.status === 'ran');
  const provenanceFile = ranAny ? writeProvenance(outDir, buildProvenance(pipeline, run, o.commandLine)) : join(outDir, PROVENANCE_FILE);

  let exitCode = 0;
  if (o.lock || lock) {
    const result = readFitResult(outDir);
    const fits = lockedFits(result);
    const tables = tableHashes(outDir, run.state);
    if (o.lock) {
      writeLock(o.lock, buildLock(pipeline.config.name, fits, tables, lockTolerance(result, { densityDex: o.densityToleranceDex, ageDex: o.ageToleranceDex })));
      o.stdout.write(`lock file written: ${displayPath(o.lock)} (${fits.length} sightlines, ${Object.keys(tables).length} tables)\n`);
    }
    if (lock && o.check) {
      const comparison = compareWithLock(lock, fits, tables, { densityDex: o.densityToleranceDex, ageDex: o.ageToleranceDex });
      o.stdout.write(`${formatComparison(comparison, displayPath(o.check))}\n`);
      if (!comparison.passed) exitCode = 1;
    }
  }
  const html = run.state.report?.outputs.find((f) => f.endsWith('.html'));
  o.stdout.write(`provenance: ${displayPath(provenanceFile)}\n`);
  if (html) o.stdout.write(`report: ${displayPath(`${outDir}/${html}`)}\n`);
  return exitCode;
}
