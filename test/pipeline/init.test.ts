import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { z } from 'zod';
import { UserError } from '../../src/config/errors.ts';
import { loadPipeline, pipelineSchema } from '../../src/config/pipeline.ts';
import { defaultStages } from '../../src/pipeline/default-stages.ts';
import { initProject } from '../../src/pipeline/init.ts';
import { runStages } from '../../src/pipeline/runner.ts';

/** Every key of every object schema reachable from a zod schema (through optional, default, arrays, unions, records). */
function schemaKeys(schema: z.ZodType, out = new Set<string>()): Set<string> {
  const def = (schema as unknown as { _zod: { def: Record<string, unknown> & { type: string } } })._zod.def;
  const visit = (s: unknown) => s && schemaKeys(s as z.ZodType, out);
  switch (def.type) {
    case 'object':
      for (const [k, v] of Object.entries(def.shape as Record<string, z.ZodType>)) {
        out.add(k);
        visit(v);
      }
      break;
    case 'optional':
    case 'default':
    case 'nullable':
    case 'prefault':
    case 'readonly':
      visit(def.innerType);
      break;
    case 'pipe':
      visit(def.in);
      break;
    case 'array':
      visit(def.element);
      break;
    case 'record':
      visit(def.valueType);
      break;
    case 'union':
      for (const o of def.options as z.ZodType[]) visit(o);
      break;
    case 'tuple':
      for (const o of def.items as z.ZodType[]) visit(o);
      break;
    default:
  }
  return out;
}

let dir: string;
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'hoarfrost-init-'));
});
afterEach(() => rmSync(dir, { recursive: true, force: true }));

describe('hoarfrost init', () => {
  it('writes a pipeline that loads, and names every option of the pipeline schema', () => {
    const r = initProject('project', dir);
    const file = join(r.dir, 'pipeline.yaml');
    const p = loadPipeline(file);
    expect(p.config.network).toBe('network.yaml');
    expect(p.config.observations?.file).toBe('observations.csv');
    const text = readFileSync(file, 'utf8');
    const missing = [...schemaKeys(pipelineSchema)].filter((k) => !new RegExp(`(^|[\\s{,#])${k}:`, 'm').test(text));
    expect(missing).toEqual([]);
  });

  it("the example table reads with the project's own network, through the observe stage", async () => {
    const r = initProject('project', dir);
    const run = await runStages(loadPipeline(join(r.dir, 'pipeline.yaml')), defaultStages(), { only: 'observe' });
    expect(run.stages[0].status).toBe('ran');
    expect(run.stages[0].summary).toMatch(/^12 sightlines, \d+ quantities/);
    expect(readFileSync(join(r.dir, 'observations.csv'), 'utf8')).toMatch(/^# INVENTED DEMO DATA/);
  });

  it("the template's commented per-quantity reference works, ratios to any observed species fit, and a column outside the network is carried with a note", async () => {
    const r = initProject('project', dir);
    const file = join(r.dir, 'pipeline.yaml');
    const text = readFileSync(file, 'utf8');
    const example = '    # - { species: NH3(s), as: ratio, reference: H2O(s) }\n';
    expect(text).toContain(example);
    writeFileSync(
      file,
      text.replace(example, [example.replace('# ', ''), '    - { species: CH3OH(s), as: ratio, reference: CO(s) }', '    - { species: N2H+, as: ratio, reference: CO }', ''].join('\n')),
    );
    // An extra column for a species the network does not hold (formic acid ice), not fitted.
    const csv = join(r.dir, 'observations.csv');
    const lines = readFileSync(csv, 'utf8').split('\n');
    const header = lines.findIndex((l) => l.startsWith('star,'));
    writeFileSync(csv, lines.map((l, i) => (i < header || l === '' ? l : i === header ? `${l},N_HCOOH_ice,N_HCOOH_ice_err` : `${l},2e16,4e15`)).join('\n'));
    const mapping = join(r.dir, 'observations.columns.yaml');
    writeFileSync(mapping, `${readFileSync(mapping, 'utf8')}  "HCOOH(s)": { value: N_HCOOH_ice, error: N_HCOOH_ice_err, unit: cm-2 }\n`);

    const run = await runStages(loadPipeline(file), defaultStages(), { only: 'observe' });
    expect(run.stages[0].status).toBe('ran');
    const warnings = run.stages[0].warnings ?? [];
    expect(warnings.some((w) => /'HCOOH\(s\)' .* is not in the network: its column is read and kept, but it cannot be fitted/.test(w))).toBe(true);
    const saved = readFileSync(join(r.dir, 'out/observations/quantities.csv'), 'utf8');
    for (const label of ['NH3(s)/H2O(s)', 'CH3OH(s)/CO(s)', 'CH3OH(s)/H2O(s)', 'N2H+/CO']) expect(saved, label).toContain(`,${label},`);
    expect(saved).not.toContain('HCOOH');
  });

  it('a reference on an abundance is refused with the line and field', () => {
    const r = initProject('project', dir);
    const file = join(r.dir, 'pipeline.yaml');
    writeFileSync(file, readFileSync(file, 'utf8').replace('{ species: CO, as: abundance }', '{ species: CO, as: abundance, reference: H2O(s) }'));
    expect(() => loadPipeline(file)).toThrow(/pipeline\.yaml:\d+, field 'fit\.quantities\[4\]\.reference': a reference applies to 'as: ratio' only/);
  });

  it('refuses to overwrite and writes nothing when any file exists', () => {
    initProject('project', dir);
    const e = (() => {
      try {
        initProject('project', dir);
      } catch (x) {
        return x;
      }
    })();
    expect(e).toBeInstanceOf(UserError);
    expect((e as Error).message).toMatch(/^project: would overwrite pipeline.yaml, .*README.md; nothing was written/);
    expect(() => initProject(join('project', 'pipeline.yaml'), dir)).toThrow(/exists and is not a folder/);
  });
});
