import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { rmSync } from 'node:fs';
import { UserError, UserErrors } from '../../src/config/errors.ts';
import { DEFAULT_TMAX, DEFAULT_TMIN, loadNetwork } from '../../src/chem/network.ts';

const dir = mkdtempSync(join(tmpdir(), 'hoarfrost-network-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function write(name: string, text: string): string {
  const file = join(dir, name);
  writeFileSync(file, text);
  return file;
}

/** The error thrown by loading a file; fails the test when it loads. */
function loadError(file: string, options = {}): UserError {
  try {
    loadNetwork(file, options);
  } catch (e) {
    expect(e).toBeInstanceOf(UserError);
    return e as UserError;
  }
  throw new Error(`${file} loaded without error`);
}

const GOOD = `format: hoarfrost-network 1
name: tiny
description: a small test network
origin: "test values"
species:
  - {name: CO, binding_energy: 1150, origin: "physics.md (memory)"}
  - {name: H, binding_energy: 450}
  - {name: HCO, binding_energy: 1600}
reactions:
  - {reactants: [H2], products: [H2+, e-], law: cosmic-ray, alpha: 1.2e-17}
  - {reactants: [H3+, CO], products: [HCO+, H2], law: arrhenius, alpha: 1.61e-9, temperature: [10, 300], origin: "memory"}
  - {reactants: [HCO+, e-], products: [CO, H], law: arrhenius, alpha: 2.8e-7, beta: -0.69}
  - {reactants: [CO], products: [CO(s)], law: accretion}
  - {reactants: [CO(s)], products: [CO], law: thermal-desorption}
  - {reactants: [CO(s)], products: [CO], law: photodesorption}
  - {reactants: [H(s), CO(s)], products: [HCO(s)], law: surface, activation_energy: 2500}
  - {reactants: [CO], products: [C, O], law: interstellar-uv, alpha: 2e-10, gamma: 3}
`;

describe('loadNetwork: YAML network', () => {
  it('loads species and reactions with law defaults filled in', () => {
    const file = write('good.yaml', GOOD);
    const net = loadNetwork(file);
    expect(net.name).toBe('tiny');
    expect(net.description).toBe('a small test network');
    expect(net.reactions).toHaveLength(8);
    const [cr, ion, dr, acc, , photo, surf, uv] = net.reactions;
    expect(cr.law).toBe('cosmic-ray');
    expect(cr.params).toEqual({ alpha: 1.2e-17 });
    expect(ion.params).toEqual({ alpha: 1.61e-9, beta: 0, gamma: 0 });
    expect([ion.tmin, ion.tmax]).toEqual([10, 300]);
    expect(ion.origin).toBe('memory');
    expect(dr.params.beta).toBe(-0.69);
    expect([dr.tmin, dr.tmax]).toEqual([DEFAULT_TMIN, DEFAULT_TMAX]);
    expect(dr.origin).toBe('test values');
    expect(acc.params).toEqual({ sticking: 1 });
    expect(photo.params).toEqual({ yield: 1e-3 });
    expect(surf.params).toEqual({ activation_energy: 2500, branching: 1 });
    expect(uv.params).toEqual({ alpha: 2e-10, gamma: 3 });
    expect(ion.source).toEqual({ file, line: 11 });
    expect(net.species.map((s) => s.name)).toEqual(['CO', 'H', 'HCO', 'H2', 'H2+', 'e-', 'H3+', 'HCO+', 'CO(s)', 'H(s)', 'HCO(s)', 'C', 'O']);
    expect(net.speciesIndex.get('CO(s)')).toBe(8);
    expect(net.speciesData.get('CO')?.bindingEnergy).toBe(1150);
    expect(net.speciesData.get('H')?.origin).toBe('test values');
    expect(net.contentHash).toBe(createHash('sha256').update(readFileSync(file)).digest('hex'));
  });

  it('a species entry may give a mass that overrides the formula', () => {
    const net = loadNetwork(write('mass.yaml', GOOD.replace('{name: H, binding_energy: 450}', '{name: H, binding_energy: 450, mass: 1.5}')));
    expect(net.species[net.speciesIndex.get('H')!].mass).toBe(1.5);
  });
});

describe('loadNetwork: every bad input is a located UserError', () => {
  it('malformed YAML names the line', () => {
    const file = write('malformed.yaml', 'format: hoarfrost-network 1\nname: x\nreactions:\n  - {reactants: [H2, products: [H2+]\n');
    const e = loadError(file);
    expect(e.message).toMatch(/malformed YAML/);
    expect(e.message).toContain(`${file}:`);
  });

  it('an empty file', () => {
    const e = loadError(write('empty.yaml', '\n'));
    expect(e.message).toMatch(/empty/);
  });

  it('a missing file', () => {
    const e = loadError(join(dir, 'nope.yaml'));
    expect(e.message).toMatch(/not found/);
  });

  it('a missing or wrong format line', () => {
    expect(loadError(write('noformat.yaml', 'name: x\nreactions: []\n')).message).toMatch(/missing 'format'/);
    const e = loadError(write('badformat.yaml', 'format: other 2\nname: x\nreactions: []\n'));
    expect(e.message).toMatch(/unknown format 'other 2'/);
    expect(e.location.line).toBe(1);
  });

  it('an unknown key names the key and its line', () => {
    const file = write('unknown-key.yaml', GOOD.replace('law: cosmic-ray, alpha: 1.2e-17', 'law: cosmic-ray, alpha: 1.2e-17, zeta: 3'));
    const e = loadError(file);
    expect(e.message).toContain(`${file}:10`);
    expect(e.message).toMatch(/unknown key 'zeta'/);
  });

  it('a wrong type says what was expected and found', () => {
    const e = loadError(write('wrong-type.yaml', GOOD.replace('alpha: 1.61e-9', 'alpha: fast')));
    expect(e.message).toMatch(/reactions\[1\]\.alpha/);
    expect(e.message).toMatch(/expected number, found the text 'fast'/);
  });

  it('a negative binding energy', () => {
    const file = write('negative-be.yaml', GOOD.replace('binding_energy: 1150', 'binding_energy: -1150'));
    const e = loadError(file);
    expect(e.message).toContain(`${file}:6`);
    expect(e.message).toMatch(/species\[0\]\.binding_energy/);
    expect(e.message).toMatch(/non-negative/);
  });

  it('a missing rate parameter', () => {
    const e = loadError(write('missing-param.yaml', GOOD.replace(', alpha: 1.2e-17', '')));
    expect(e.message).toMatch(/reactions\[0\]\.alpha/);
    expect(e.message).toMatch(/missing the parameter 'alpha' of the law cosmic-ray/);
  });

  it('a parameter the law does not take', () => {
    const e = loadError(write('foreign-param.yaml', GOOD.replace('law: thermal-desorption}', 'law: thermal-desorption, yield: 0.1}')));
    expect(e.message).toMatch(/the law thermal-desorption has no parameter 'yield'/);
  });

  it('an unknown species that is not a formula', () => {
    const file = write('unknown-species.yaml', GOOD.replace('products: [H2+, e-], law: cosmic-ray', 'products: [H2+, Qx], law: cosmic-ray'));
    const e = loadError(file);
    expect(e.message).toContain(`${file}:10`);
    expect(e.message).toMatch(/reactions\[0\]\.products\[1\]/);
    expect(e.message).toMatch(/'Qx' is not a species name: unknown element 'Qx'/);
  });

  it('an unknown rate law lists the known ones', () => {
    const e = loadError(write('unknown-law.yaml', GOOD.replace('law: cosmic-ray,', 'law: cosmic-rays,')));
    expect(e.message).toMatch(/unknown rate law 'cosmic-rays'; expected one of arrhenius, cosmic-ray/);
  });

  it('reactant counts and phases are checked per law', () => {
    const text = GOOD.replace('{reactants: [CO], products: [CO(s)], law: accretion}', '{reactants: [CO, H], products: [CO(s)], law: accretion}').replace(
      '{reactants: [CO(s)], products: [CO], law: thermal-desorption}',
      '{reactants: [CO], products: [CO], law: thermal-desorption}',
    );
    const e = loadError(write('phases.yaml', text)) as UserErrors;
    expect(e.message).toMatch(/the law accretion takes 1 reactant; found 2/);
    expect(e.message).toMatch(/the law thermal-desorption takes ice reactants/);
  });

  it('accretion and desorption move one species between its gas and ice forms', () => {
    const e = loadError(write('phase-change.yaml', GOOD.replace('products: [CO(s)], law: accretion', 'products: [HCO(s)], law: accretion')));
    expect(e.message).toMatch(/the law accretion moves one species between gas and ice: CO -> CO\(s\); found products HCO\(s\)/);
  });

  it('an ice species without a binding energy', () => {
    const e = loadError(write('no-be.yaml', GOOD.replace('  - {name: CO, binding_energy: 1150, origin: "physics.md (memory)"}\n', '')));
    expect(e.message).toMatch(/the ice species CO\(s\) has no binding energy/);
  });

  it('a temperature range on a grain process', () => {
    const e = loadError(write('grain-range.yaml', GOOD.replace('law: accretion}', 'law: accretion, temperature: [10, 20]}')));
    expect(e.message).toMatch(/the law accretion does not depend on the gas temperature/);
  });

  it('a temperature range with a 0 K edge (the laws divide by T)', () => {
    const e = loadError(write('zero-range.yaml', GOOD.replace('temperature: [10, 300]', 'temperature: [0, 0]')));
    expect(e.message).toMatch(/reactions\[\d\]\.temperature/);
    expect(e.message).toMatch(/two positive finite temperatures .* found \[0, 0\]/);
  });

  it('parametric-h2 must be H + H -> H2', () => {
    const e = loadError(write('param-h2.yaml', GOOD.replace('law: cosmic-ray, alpha: 1.2e-17}', 'law: cosmic-ray, alpha: 1.2e-17}\n  - {reactants: [H, O], products: [OH], law: parametric-h2}')));
    expect(e.message).toMatch(/parametric-h2 .* reactants \[H, H\], products \[H2\]/);
  });

  it('collects every problem of a file, each with its own line', () => {
    const text = GOOD.replace('binding_energy: 1150', 'binding_energy: -1')
      .replace(', alpha: 1.2e-17', '')
      .replace('products: [CO, H]', 'products: [CO, Hx]')
      .replace('gamma: 3}', 'gamma: 3, colour: red}');
    const e = loadError(write('many.yaml', text));
    expect(e).toBeInstanceOf(UserErrors);
    const problems = (e as UserErrors).problems;
    expect(problems.length).toBe(4);
    expect(problems.map((p) => p.location.line).sort((a, b) => a! - b!)).toEqual([6, 10, 12, 17]);
  });
});

describe('loadNetwork: CSV/TSV tables with a column mapping', () => {
  const MAPPING = `format: hoarfrost-network-table 1
name: table-net
origin: "user table"
columns:
  reactants: [r1, r2]
  products: [p1, p2, p3]
  law: kind
  parameters: {alpha: a, beta: b, gamma: c}
  temperature: [tlow, thigh]
  origin: ref
law_codes: {"1": cosmic-ray, "2": arrhenius, "3": accretion, "4": thermal-desorption, "5": cosmic-ray-uv}
law_parameters:
  cosmic-ray-uv: {alpha: c}
species:
  - {name: CO, binding_energy: 1150}
`;
  const TABLE = `# a network a user already holds
r1,r2,p1,p2,p3,kind,a,b,c,tlow,thigh,ref
H2,,H2+,e-,,1,1.2e-17,0,0,,,
H3+,CO,HCO+,H2,,2,1.61e-9,0,0,10,300,mine
HCO+,e-,CO,H,,2,2.8e-7,-0.69,0,10,300,
CO,,CO(s),,,3,,,,,,
CO(s),,CO,,,4,,,,,,
CO,,C,O,,5,0,0,6.5e-17,,,
`;

  it('reads a table with the sibling <stem>.mapping.yaml', () => {
    write('net.mapping.yaml', MAPPING);
    const table = write('net.csv', TABLE);
    const net = loadNetwork(table);
    expect(net.name).toBe('table-net');
    expect(net.reactions).toHaveLength(6);
    const [cr, ion, dr, acc, des, cruv] = net.reactions;
    expect(cr.params).toEqual({ alpha: 1.2e-17 });
    expect(ion).toMatchObject({ reactants: ['H3+', 'CO'], products: ['HCO+', 'H2'], law: 'arrhenius', tmin: 10, tmax: 300, origin: 'mine' });
    expect(dr.params).toEqual({ alpha: 2.8e-7, beta: -0.69, gamma: 0 });
    expect(dr.origin).toBe('user table');
    expect(acc.params).toEqual({ sticking: 1 });
    expect(des.law).toBe('thermal-desorption');
    expect(cruv.params).toEqual({ alpha: 6.5e-17 });
    expect(ion.source).toEqual({ file: table, line: 4, row: 2 });
    const h = (f: string) => createHash('sha256').update(readFileSync(join(dir, f))).digest();
    expect(net.contentHash).toBe(createHash('sha256').update(h('net.mapping.yaml')).update(h('net.csv')).digest('hex'));
  });

  it('reads a TSV with a mapping given explicitly, and a mapping file that names its table', () => {
    const mapping = write('other-mapping.yaml', MAPPING);
    const tsv = write('net2.tsv', TABLE.replaceAll(',', '\t'));
    expect(loadNetwork(tsv, { mapping }).reactions).toHaveLength(6);
    const named = write('named.yaml', MAPPING.replace('origin: "user table"', 'origin: "user table"\ntable: net2.tsv'));
    expect(loadNetwork(named).reactions).toHaveLength(6);
  });

  it('the content hash changes with the mapping', () => {
    write('h1.mapping.yaml', MAPPING);
    write('h2.mapping.yaml', MAPPING.replace('user table', 'user table, v2'));
    const a = loadNetwork(write('h1.csv', TABLE)).contentHash;
    const b = loadNetwork(write('h2.csv', TABLE)).contentHash;
    expect(a).not.toBe(b);
  });

  it('a short row is reported with its line and row; nothing is dropped silently', () => {
    write('short.mapping.yaml', MAPPING);
    const table = write('short.csv', TABLE.replace('HCO+,e-,CO,H,,2,2.8e-7,-0.69,0,10,300,', 'HCO+,e-,CO,H,,2,2.8e-7'));
    const e = loadError(table);
    expect(e.message).toContain(`${table}:5, row 3`);
    expect(e.message).toMatch(/this row has 7 cells, expected 12 as in the header/);
  });

  it('bad cells name the row and the column', () => {
    write('cells.mapping.yaml', MAPPING);
    const text = TABLE.replace('1.61e-9', 'fast').replace('CO(s),,CO,,,4', 'CO(s),,CO,,,9').replace('H2,,H2+,e-,,1,1.2e-17,0,0', 'H2,,H2+,e-,,1,1.2e-17,0,7');
    const e = loadError(write('cells.csv', text)) as UserErrors;
    const messages = e.problems.map((p) => p.message);
    expect(messages.some((m) => /row 2, field 'a': expected a number for alpha; found 'fast'/.test(m))).toBe(true);
    expect(messages.some((m) => /row 5, field 'kind': the law code '9' is not in law_codes/.test(m))).toBe(true);
    expect(messages.some((m) => /row 1, field 'c': the law cosmic-ray does not use this column, but the cell holds '7'/.test(m))).toBe(true);
  });

  it('unused_cells: ignore accepts filled cells the law does not use', () => {
    write('ignore.mapping.yaml', MAPPING + 'unused_cells: ignore\n');
    const net = loadNetwork(write('ignore.csv', TABLE.replace('H2,,H2+,e-,,1,1.2e-17,0,0', 'H2,,H2+,e-,,1,1.2e-17,0,7')));
    expect(net.reactions[0].params).toEqual({ alpha: 1.2e-17 });
  });

  it('a bad species in a row names the row and its column', () => {
    write('species.mapping.yaml', MAPPING);
    const e = loadError(write('species.csv', TABLE.replace('H3+,CO,HCO+', 'H3+,CO,HCOO+x')));
    expect(e.message).toMatch(/row 2, field 'p1': 'HCOO\+x' is not a species name/);
  });

  it('a table without a mapping, and mapping errors located in the mapping', () => {
    expect(loadError(write('lonely.csv', TABLE)).message).toMatch(/needs a column mapping; none found at .*lonely\.mapping\.yaml/);
    write('badmap.mapping.yaml', MAPPING.replace('[r1, r2]', '[r1, r9]').replace('"5": cosmic-ray-uv', '"5": cosmic-rayuv'));
    const e = loadError(write('badmap.csv', TABLE)) as UserErrors;
    expect(e.message).toMatch(/the table has no column 'r9'/);
    expect(e.message).toMatch(/unknown rate law 'cosmic-rayuv'/);
    expect(e.problems.every((p) => p.location.file?.endsWith('badmap.mapping.yaml'))).toBe(true);
  });

  it('process tokens, renamed species and an ice prefix are translated as the mapping says', () => {
    write('names.mapping.yaml', MAPPING + 'not_species: [CR, PHOTON]\nrename: {carbonmonoxide: CO}\nice_prefix: "i_"\n');
    const text = TABLE.replace('H2,,H2+,e-,,1', 'H2,CR,H2+,e-,,1').replace('CO,,CO(s),,,3', 'carbonmonoxide,,i_CO,,,3').replace('CO,,C,O,,5', 'CO,PHOTON,C,O,,5');
    const net = loadNetwork(write('names.csv', text));
    expect(net.reactions[0].reactants).toEqual(['H2']);
    expect(net.reactions[3]).toMatchObject({ reactants: ['CO'], products: ['CO(s)'], law: 'accretion' });
    expect(net.reactions[5].reactants).toEqual(['CO']);
  });

  it('a table with a header and no rows', () => {
    write('norows.mapping.yaml', MAPPING);
    expect(loadError(write('norows.csv', 'r1,r2,p1,p2,p3,kind,a,b,c,tlow,thigh,ref\n')).message).toMatch(/no data rows/);
  });
});
