import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { loadYamlFile, parseYamlText, validate } from '../../src/config/yaml.ts';
import { checkConditionValue, defaultConditions } from '../../src/config/conditions.ts';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { catchUserError } from '../support/errors.ts';
import { scratch } from '../support/scratch.ts';

const caught = catchUserError;

describe('YAML loading with located errors', () => {
  const schema = z.object({ name: z.string(), items: z.array(z.object({ value: z.number() }).strict()) }).strict();

  it('names file and line of malformed YAML', () => {
    const e = caught(() => parseYamlText('name: a\nitems: [1, 2\n', 'bad.yaml'));
    expect(e.message).toMatch(/^bad\.yaml:\d+: malformed YAML/);
  });

  it('refuses an empty file', () => {
    expect(caught(() => parseYamlText('  \n', 'empty.yaml')).message).toContain('empty.yaml: the file is empty');
  });

  it('reports an unknown key with its line', () => {
    const loaded = parseYamlText('name: a\nitems:\n  - value: 1\n  - value: 2\n    colour: red\n', 'f.yaml');
    const e = caught(() => validate(schema, loaded));
    expect(e.message).toBe("f.yaml:5, field 'items[1]': unknown key 'colour'. Remove it or check the spelling.");
  });

  it('reports a wrong type with field, expected and found', () => {
    const loaded = parseYamlText('name: a\nitems:\n  - value: lots\n', 'f.yaml');
    const e = caught(() => validate(schema, loaded));
    expect(e.message).toContain("f.yaml:3, field 'items[0].value'");
    expect(e.message).toContain('expected number');
    expect(e.message).toContain("'lots'");
  });

  it('reports a missing file by path', () => {
    expect(caught(() => loadYamlFile('/nonexistent/p.yaml', 'pipeline file')).message).toContain('/nonexistent/p.yaml: pipeline file not found');
  });

  it('an alias bomb is refused as a located error naming the first alias, before it expands', () => {
    const bomb = ['a: &a [x, x, x, x, x, x, x, x, x]', ...'bcdef'.split('').map((k, i) => `${k}: &${k} [${Array(9).fill(`*${'abcde'[i]}`).join(', ')}]`), ''].join('\n');
    const e = caught(() => parseYamlText(bomb, 'bomb.yaml'));
    expect(e.message).toMatch(/^bomb\.yaml:2: the aliases \(\*name\) of this file expand to more than 1000 copies/);
  });

  it('nesting deeper than the limit is refused with the line where it passes the limit', () => {
    const deep = Array.from({ length: 150 }, (_, i) => `${' '.repeat(i)}a:`).join('\n') + ' 1\n';
    expect(caught(() => parseYamlText(deep, 'deep.yaml')).message).toMatch(/^deep\.yaml:101: values are nested more than 100 deep/);
    const flow = `a: ${'['.repeat(10_000)}${']'.repeat(10_000)}\n`;
    expect(caught(() => parseYamlText(flow, 'flow.yaml')).message).toMatch(/^flow\.yaml:1: values are nested more than 100 deep/);
  });

  it('lists every problem of a document, not only the first', () => {
    const loaded = parseYamlText('name: 3\nitems:\n  - value: x\n', 'f.yaml');
    const e = caught(() => validate(schema, loaded));
    expect(e.message).toContain("field 'name'");
    expect(e.message).toContain("field 'items[0].value'");
  });
});

describe('physical conditions', () => {
  it('defaults are all acceptable values', () => {
    const c = defaultConditions();
    for (const [name, value] of Object.entries(c)) expect(checkConditionValue(name as keyof typeof c, value)).toBeUndefined();
  });
  it('rejects a negative density and a zero dust temperature', () => {
    expect(checkConditionValue('density', -1)).toContain('greater than 0');
    expect(checkConditionValue('dust_temperature', 0)).toContain('greater than 0');
    expect(checkConditionValue('visual_extinction', 0)).toBeUndefined();
  });
});

describe('pipeline file', () => {
  it('resolves paths against the pipeline folder and fills defaults', () => {
    const dir = scratch('hf-pipe-');
    const file = join(dir, 'p.yaml');
    writeFileSync(file, 'network: nets/n.yaml\n');
    const p = loadPipeline(file);
    expect(p.resolvePath(p.config.network)).toBe(join(dir, 'nets/n.yaml'));
    expect(p.config.solver.rtol).toBeGreaterThan(0);
  });
  it('refuses an unknown top-level key', () => {
    const dir = scratch('hf-pipe-');
    const file = join(dir, 'p.yaml');
    writeFileSync(file, 'network: n.yaml\nnetwrok: m.yaml\n');
    expect(caught(() => loadPipeline(file)).message).toContain("unknown key 'netwrok'");
  });
});
