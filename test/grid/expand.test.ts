import { describe, expect, it } from 'vitest';
import { CONDITION_NAMES, CONDITIONS } from '../../src/config/conditions.ts';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { expandGrid, gridSpecFromPipeline, pointId, rangeValues } from '../../src/grid/expand.ts';
import { parseShard, inShard } from '../../src/grid/shard.ts';
import { binSightlineAv, sightlineModelAv } from '../../src/grid/sightlines.ts';
import { caught, scratch, writePipeline } from './helpers.ts';

function expand(body: string, sightlineAv?: number[]) {
  const p = loadPipeline(writePipeline(scratch(), body));
  return expandGrid(gridSpecFromPipeline(p, sightlineAv));
}

describe('grid expansion', () => {
  it('fills every condition, unset ones with their defaults', () => {
    const g = expand('conditions:\n  density: 3.0e4\n');
    expect(g.points).toHaveLength(1);
    const c = g.points[0].conditions;
    expect(Object.keys(c).sort()).toEqual([...CONDITION_NAMES].sort());
    expect(c.density).toBe(3e4);
    expect(c.gas_temperature).toBe(CONDITIONS.gas_temperature.default);
    expect(c.site_density).toBe(CONDITIONS.site_density.default);
    expect(g.varied).toEqual([]);
  });

  it('makes log ranges with exact decades and linear ranges with exact steps', () => {
    expect(rangeValues({ from: 1e3, to: 1e5, count: 3, scale: 'log' })).toEqual([1e3, 1e4, 1e5]);
    expect(rangeValues({ from: 1e2, to: 1e6, count: 5, scale: 'log' })).toEqual([1e2, 1e3, 1e4, 1e5, 1e6]);
    expect(rangeValues({ from: 10, to: 20, count: 6, scale: 'linear' })).toEqual([10, 12, 14, 16, 18, 20]);
    // sqrt(10) * 1e3 to 12 significant digits: the half-decade point.
    expect(rangeValues({ from: 1e3, to: 1e4, count: 3, scale: 'log' })[1]).toBe(3162.27766017);
  });

  it('takes the Cartesian product of the axes, the last condition fastest', () => {
    const g = expand('conditions:\n  density: [1.0e3, 1.0e4]\n  gas_temperature: [10, 20, 30]\n');
    expect(g.points.map((p) => [p.conditions.density, p.conditions.gas_temperature])).toEqual([
      [1e3, 10], [1e3, 20], [1e3, 30], [1e4, 10], [1e4, 20], [1e4, 30],
    ]);
    expect(g.points.map((p) => p.index)).toEqual([0, 1, 2, 3, 4, 5]);
    expect(g.varied).toEqual(['density', 'gas_temperature']);
  });

  it('resolves ties, chained and with factors', () => {
    const g = expand(
      'conditions:\n  gas_temperature: [10, 20]\n  dust_temperature: { tie: gas_temperature }\n  grain_radius: { tie: dust_temperature, factor: 0.01 }\n',
    );
    expect(g.points.map((p) => [p.conditions.gas_temperature, p.conditions.dust_temperature, p.conditions.grain_radius])).toEqual([
      [10, 10, 0.1],
      [20, 20, 0.2],
    ]);
    expect(g.varied).toEqual(['gas_temperature', 'dust_temperature', 'grain_radius']);
  });

  it('ties the model A_V to the sightlines: fraction times observed A_V, binned', () => {
    // model_av_fraction defaults to 0.5 (common practice toward background stars).
    const g = expand('conditions:\n  visual_extinction: { tie: sightlines, step: 1 }\n', [4.2, 6.1, 5.8, 20, 0.4]);
    expect(g.points.map((p) => p.conditions.visual_extinction)).toEqual([0, 2, 3, 10]);
    expect(sightlineModelAv(6.1, 0.5, 1)).toBe(3);
    expect(binSightlineAv([3.3, 3.6], 0.5, 0.5)).toEqual([1.5, 2]);
  });

  it('leaves out points matched by every entry of an exclusion rule', () => {
    const g = expand(`conditions:
  density: [1.0e3, 1.0e4, 1.0e5]
  gas_temperature: [10, 20]
  dust_temperature: [10, 15, 20]
exclude:
  - dust_temperature: { above: gas_temperature }
  - density: { at_least: 1.0e5 }
    gas_temperature: 20
  - density: 7.0e7
`);
    // 18 in the product; dust > gas removes (gas 10: dust 15, 20) = 2 per density = 6; (1e5, gas 20, any dust) = 3 more.
    expect(g.excluded).toBe(9);
    expect(g.points).toHaveLength(9);
    for (const p of g.points) {
      expect(p.conditions.dust_temperature).toBeLessThanOrEqual(p.conditions.gas_temperature);
      expect(p.conditions.density === 1e5 && p.conditions.gas_temperature === 20).toBe(false);
    }
    expect(g.unusedRules).toEqual([2]);
  });

  it('gives ids that depend only on the conditions', () => {
    const a = expand('conditions:\n  density: [1.0e3, 1.0e4]\n');
    const b = expand('conditions:\n  density: [1.0e4, 1.0e3, 1.0e5]\n');
    expect(a.points[0].id).toMatch(/^p[0-9a-f]{16}$/);
    expect(b.points[1].id).toBe(a.points[0].id);
    expect(b.points[0].id).toBe(a.points[1].id);
    expect(new Set(b.points.map((p) => p.id)).size).toBe(3);
    expect(pointId({ ...a.points[0].conditions, density: 1e3 + 1e-9 })).not.toBe(a.points[0].id);
  });
});

describe('grid expansion: bad input', () => {
  const bad = (body: string, sightlineAv?: number[]) => caught(() => expand(body, sightlineAv));

  it('refuses an empty axis, naming the line', () => {
    const e = bad('conditions:\n  density: []\n');
    expect(e.message).toMatch(/pipeline\.yaml:6, field 'conditions\.density': the list of values is empty/);
  });

  it('refuses a range with from > to', () => {
    expect(bad('conditions:\n  density: { from: 1.0e5, to: 1.0e3, count: 3 }\n').message).toMatch(/:6, .*a range needs from < to, found from 100000 and to 1000/);
  });

  it('refuses an unknown condition name and lists the known ones', () => {
    const e = bad('conditions:\n  densty: 1.0e4\n');
    expect(e.message).toMatch(/:6, field 'conditions\.densty': unknown condition 'densty'\. Known conditions: density, gas_temperature/);
  });

  it('refuses values outside a condition\'s limits, a one-value range, a log range from 0', () => {
    expect(bad('conditions:\n  gas_temperature: [10, -5]\n').message).toMatch(/gas_temperature must be greater than 0 K, found -5/);
    expect(bad('conditions:\n  density: { from: 1, to: 10, count: 1 }\n').message).toMatch(/count of at least 2/);
    expect(bad('conditions:\n  uv_field: { from: 0, to: 10, count: 3 }\n').message).toMatch(/logarithmic range needs from > 0/);
    expect(bad('conditions:\n  density: [1.0e3, 1.0e3]\n').message).toMatch(/appears twice/);
  });

  it('refuses tie loops, ties to unknown names, a tie that breaks a limit', () => {
    expect(bad('conditions:\n  gas_temperature: { tie: dust_temperature }\n  dust_temperature: { tie: gas_temperature }\n').message).toMatch(/form a loop/);
    expect(bad('conditions:\n  dust_temperature: { tie: gas_temp }\n').message).toMatch(/cannot tie dust_temperature to 'gas_temp'/);
    expect(bad('conditions:\n  density: { tie: sightlines }\n').message).toMatch(/only visual_extinction can be tied to the sightlines/);
    expect(bad('conditions:\n  diffusion_ratio: { tie: uv_field, factor: 2 }\n').message).toMatch(/diffusion_ratio must be at most 1, found 2: diffusion_ratio is tied to uv_field/);
    expect(bad('conditions:\n  visual_extinction: { tie: sightlines }\n').message).toMatch(/no observations/);
  });

  it('reports every problem at once', () => {
    const e = bad('conditions:\n  densty: 1\n  gas_temperature: []\n');
    expect(e.message).toMatch(/2 problems in the grid conditions/);
  });

  it('refuses exclusion rules with unknown names and a grid excluded entirely', () => {
    expect(bad('exclude:\n  - dust_temp: 10\n').message).toMatch(/unknown condition 'dust_temp' in exclusion rule 1/);
    expect(bad('exclude:\n  - density: { above: gas_temp }\n').message).toMatch(/'gas_temp' is neither a number nor a condition name/);
    expect(bad('exclude:\n  - density: { at_least: 1 }\n').message).toMatch(/every one of the 1 grid points is excluded/);
  });
});

describe('shards', () => {
  it('parses K/N, 1-based, and refuses anything else', () => {
    expect(parseShard('2/3')).toEqual({ index: 2, count: 3 });
    expect(caught(() => parseShard('4/3')).message).toMatch(/--shard 4\/3: the shard number K must be between 1 and 3/);
    expect(caught(() => parseShard('0/3')).message).toMatch(/between 1 and 3/);
    expect(caught(() => parseShard('1/0')).message).toMatch(/at least 1/);
    expect(caught(() => parseShard('two/3')).message).toMatch(/expects K\/N/);
  });

  it('deals every point to exactly one shard', () => {
    const counts = [0, 0, 0];
    for (let i = 0; i < 100; i++) {
      const owners = [1, 2, 3].filter((k) => inShard(i, { index: k, count: 3 }));
      expect(owners).toHaveLength(1);
      counts[owners[0] - 1]++;
    }
    expect(counts).toEqual([34, 33, 33]);
  });
});
