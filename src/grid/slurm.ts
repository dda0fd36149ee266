/**
 * An sbatch job-array script for a grid split into N shards: array task K
 * (1..N, Slurm's SLURM_ARRAY_TASK_ID) runs `hoarfrost grid --shard K/N` and
 * writes OUT/store/shard-K-of-N.sqlite; `hoarfrost merge` joins them after.
 * Paths are absolute (node, the tool's entry, the pipeline), so the script
 * runs from any folder on any node that sees the same file system.
 */
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { UserError } from '../config/errors.ts';

/** The tool's command-line entry. */
export const HOARFROST_BIN = resolve(dirname(fileURLToPath(import.meta.url)), '../../bin/hoarfrost.mjs');
/** Slurm's accepted time forms: minutes, MM:SS, HH:MM:SS, D-HH, D-HH:MM, D-HH:MM:SS. */
const SLURM_TIME = /^(\d+|\d+:\d{2}|\d+:\d{2}:\d{2}|\d+-\d+|\d+-\d+:\d{2}|\d+-\d+:\d{2}:\d{2})$/;
const SAFE_NAME = /^[A-Za-z0-9._-]+$/;
/** Slurm's memory forms (sbatch --mem): a whole number with an optional unit K, M, G or T (default M). */
const SLURM_MEMORY = /^\d+[KMGT]?$/;
/** An extra sbatch option: `--name` or `--name=value`, printable, no spaces that would split the directive, nothing a shell reads. */
const SBATCH_OPTION = /^--[a-z][a-z0-9-]*(=[A-Za-z0-9._,:=@%/+-]+)?$/;
/** Options the script sets itself: given again as an extra line they would contradict it. */
const OWN_OPTIONS = ['--job-name', '--array', '--ntasks', '--cpus-per-task', '--time', '--partition', '--output', '--signal', '--account', '--mem', '--qos'];

export interface SlurmScriptOptions {
  pipelineFile: string;
  /** Output folder of the pipeline (absolute). */
  outDir: string;
  name: string;
  shards: number;
  partition?: string;
  time?: string;
  cpus: number;
  /** Account charged for the job (most computing centres require one). */
  account?: string;
  /** Memory per node, Slurm form (4G, 4000M). */
  mem?: string;
  /** Quality of service. */
  qos?: string;
  /** Further sbatch options, one `--name=value` each, written as `#SBATCH` lines. */
  extra?: string[];
  /** The node executable (default: the one running now). */
  node?: string;
}

function shellQuote(s: string): string {
  return `'${s.replace(/'/g, `'\\''`)}'`;
}

export function checkSlurmOptions(o: Pick<SlurmScriptOptions, 'shards' | 'cpus' | 'time' | 'partition' | 'account' | 'mem' | 'qos' | 'extra'>): void {
  if (!Number.isInteger(o.shards) || o.shards < 1) throw new UserError(`--shards needs a whole number of at least 1, found ${o.shards}.`);
  if (!Number.isInteger(o.cpus) || o.cpus < 1) throw new UserError(`--cpus needs a whole number of at least 1, found ${o.cpus}.`);
  if (o.time !== undefined && !SLURM_TIME.test(o.time)) throw new UserError(`--time '${o.time}' is not a Slurm time; write minutes (90), HH:MM:SS (01:30:00) or D-HH:MM:SS (1-12:00:00).`);
  if (o.partition !== undefined && !SAFE_NAME.test(o.partition)) throw new UserError(`--partition '${o.partition}' is not a partition name (letters, digits, '.', '_' and '-').`);
  if (o.account !== undefined && !SAFE_NAME.test(o.account)) throw new UserError(`--account '${o.account}' is not an account name (letters, digits, '.', '_' and '-').`);
  if (o.qos !== undefined && !SAFE_NAME.test(o.qos)) throw new UserError(`--qos '${o.qos}' is not a QOS name (letters, digits, '.', '_' and '-').`);
  if (o.mem !== undefined && !SLURM_MEMORY.test(o.mem)) throw new UserError(`--mem '${o.mem}' is not a Slurm memory size; write a whole number with K, M, G or T (4G, 4000M).`);
  for (const line of o.extra ?? []) {
    if (!SBATCH_OPTION.test(line)) throw new UserError(`--sbatch '${line}' is not one sbatch option; write it as --name=value (for example --sbatch=--constraint=cpu), one per --sbatch.`);
    const name = line.split('=')[0];
    if (OWN_OPTIONS.includes(name)) throw new UserError(`--sbatch '${line}' sets ${name}, which the script sets itself; use the command's own option${name === '--job-name' || name === '--array' || name === '--output' || name === '--ntasks' || name === '--signal' ? ' (it is fixed by the shards)' : ` ${name.replace('--cpus-per-task', '--cpus')}`}.`);
  }
}

export function slurmScript(o: SlurmScriptOptions): string {
  checkSlurmOptions(o);
  const node = o.node ?? process.execPath;
  const pipeline = resolve(o.pipelineFile);
  const logDir = join(o.outDir, 'slurm');
  const jobName = `hoarfrost-${o.name.replace(/[^A-Za-z0-9._-]/g, '_')}`;
  const lines = [
    '#!/bin/bash',
    `# hoarfrost grid of ${pipeline} as a Slurm job array of ${o.shards} shards.`,
    `# Submit: sbatch ${shellQuote(join(logDir, 'grid-array.sh'))}`,
    `# After every task has finished: ${shellQuote(node)} ${shellQuote(HOARFROST_BIN)} merge ${shellQuote(pipeline)}`,
    `#SBATCH --job-name=${jobName}`,
    `#SBATCH --array=1-${o.shards}`,
    `#SBATCH --ntasks=1`,
    `#SBATCH --cpus-per-task=${o.cpus}`,
    ...(o.time ? [`#SBATCH --time=${o.time}`] : []),
    ...(o.partition ? [`#SBATCH --partition=${o.partition}`] : []),
    ...(o.account ? [`#SBATCH --account=${o.account}`] : []),
    ...(o.qos ? [`#SBATCH --qos=${o.qos}`] : []),
    ...(o.mem ? [`#SBATCH --mem=${o.mem}`] : []),
    ...(o.extra ?? []).map((line) => `#SBATCH ${line}`),
    `#SBATCH --output=${join(logDir, `shard-%a-of-${o.shards}.log`)}`,
    // A signal some minutes before the time limit lets the grid commit what it has and stop cleanly.
    `#SBATCH --signal=B:TERM@120`,
    'set -euo pipefail',
    `cd ${shellQuote(dirname(pipeline))}`,
    `exec ${shellQuote(node)} ${shellQuote(HOARFROST_BIN)} grid ${shellQuote(pipeline)} --shard "\${SLURM_ARRAY_TASK_ID}/${o.shards}" --workers "\${SLURM_CPUS_PER_TASK:-${o.cpus}}"`,
    '',
  ];
  return lines.join('\n');
}
