/** `hoarfrost spread`: realizations of one model with spread bands and the sensitivity table, on the tiny test network. */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { expectNoStack, runCli } from '../support/cli.ts';
import { scratch, writePipeline } from '../grid/helpers.ts';

describe('hoarfrost spread', () => {
  it('writes the spread over time, the sensitivity of every reaction and both figures; a rerun takes the realizations from the store', () => {
    const dir = scratch('hoarfrost-spread-');
    const pipeline = writePipeline(dir, 'conditions: { density: 1.0e4 }\n');
    const out = join(dir, 'spread');
    const first = runCli(['spread', pipeline, '--realizations', '6', '--workers', '1', '--species', 'HCO+,CO(s)', '--out', out]);
    expect(first.stderr).toMatch(/realizations: 6 to run on 1 worker, 0 already/);
    expect(first.code).toBe(0);
    expect(first.stdout).toMatch(/6 realizations of network grid-test-tiny \(seed 1; 6 computed now, 0 from the store\)/);
    expect(first.stdout).toMatch(/can arise by chance/);
    const csv = readFileSync(join(out, 'spread.csv'), 'utf8').trim().split('\n');
    expect(csv[0]).toBe('age_yr,species,nominal,median,lo_16,hi_84,mean_log10,sd_dex');
    expect(csv).toHaveLength(1 + 9 * 8); // 9 output times x 8 species of the tiny network
    const sensitivity = readFileSync(join(out, 'sensitivity.csv'), 'utf8').trim().split('\n');
    expect(sensitivity[0]).toBe('species,age_yr,rank,reaction,equation,law,uncertainty_factor,pearson_coefficient');
    // Every drawn reaction of the tiny network (9, all F > 1 by default) for each of the 2 species.
    expect(sensitivity).toHaveLength(1 + 2 * 9);
    const json = JSON.parse(readFileSync(join(out, 'spread.json'), 'utf8'));
    expect(json.realizations).toMatchObject({ requested: 6, finished: 6, missing: [], seed: 1 });
    expect(json.spread_dex['HCO+'].every((v: number) => v > 0)).toBe(true);
    expect(readFileSync(join(out, 'spread.svg'), 'utf8')).toMatch(/^<svg/);
    expect(readFileSync(join(out, 'sensitivity.svg'), 'utf8')).toMatch(/^<svg/);

    const again = runCli(['spread', pipeline, '--realizations', '6', '--workers', '1', '--species', 'HCO+', '--out', out]);
    expect(again.code).toBe(0);
    expect(again.stdout).toMatch(/0 computed now, 6 from the store/);
  });

  it('in two shards merged gives the same spread, bit for bit, as on one worker', () => {
    const whole = scratch('hoarfrost-spread-');
    const sharded = scratch('hoarfrost-spread-');
    const args = (dir: string) => ['spread', writePipeline(dir, 'conditions: { density: 3.0e4 }\n'), '--realizations', '4', '--seed', '9', '--workers', '1', '--out', join(dir, 'spread')];
    expect(runCli(args(whole)).code).toBe(0);
    for (const k of ['1/2', '2/2']) {
      const r = runCli([...args(sharded), '--shard', k]);
      expect(r.code, r.stderr).toBe(0);
      expect(r.stdout).toMatch(new RegExp(`shard ${k}: 2 realizations \\(2 computed`));
    }
    const merged = runCli([...args(sharded), '--merge-shards']);
    expect(merged.code, merged.stderr).toBe(0);
    expect(merged.stderr).toMatch(/merged 2 shard stores: 4 realizations copied/);
    expect(merged.stdout).toMatch(/0 computed now, 4 from the store/);
    expect(readFileSync(join(sharded, 'spread/spread.csv'), 'utf8')).toBe(readFileSync(join(whole, 'spread/spread.csv'), 'utf8'));
    expect(readFileSync(join(sharded, 'spread/sensitivity.csv'), 'utf8')).toBe(readFileSync(join(whole, 'spread/sensitivity.csv'), 'utf8'));
  });

  it('refuses a bad number of realizations and an unknown method, with no stack', () => {
    const dir = scratch('hoarfrost-spread-');
    const pipeline = writePipeline(dir, '');
    const one = runCli(['spread', pipeline, '--realizations', '1']);
    expect(one.code).toBe(2);
    expect(one.stderr).toMatch(/--realizations expects a whole number of at least 2, found '1'/);
    expectNoStack(one.stderr);
    const bad = runCli(['spread', pipeline, '--method', 'kendall']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/--method expects pearson or spearman/);
  });
});
