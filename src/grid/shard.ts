/**
 * Deterministic shards for batch schedulers: shard K of N (1-based, as a
 * Slurm array `--array=1-N` numbers its tasks) takes the grid points whose
 * position i in grid order has i mod N = K - 1. Round-robin keeps shards
 * within one point of each other and mixes cheap and costly corners of the
 * grid into every shard.
 */
import { UserError } from '../config/errors.ts';

export interface Shard {
  /** 1-based. */
  index: number;
  count: number;
}

const SHARD_PATTERN = /^\s*(\d+)\s*\/\s*(\d+)\s*$/;

export function parseShard(text: string): Shard {
  const m = SHARD_PATTERN.exec(text);
  if (!m) throw new UserError(`--shard expects K/N with whole numbers, e.g. --shard 2/8 for the second of eight shards; found '${text}'.`);
  const index = Number(m[1]);
  const count = Number(m[2]);
  if (count < 1) throw new UserError(`--shard ${text}: the number of shards N must be at least 1.`);
  if (index < 1 || index > count) throw new UserError(`--shard ${text}: the shard number K must be between 1 and ${count} (shards are numbered from 1).`);
  return { index, count };
}

export function inShard(position: number, shard: Shard): boolean {
  return position % shard.count === shard.index - 1;
}

export function shardLabel(shard: Shard): string {
  return `${shard.index}/${shard.count}`;
}
