import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli } from '../support/cli.ts';

const dir = mkdtempSync(join(tmpdir(), 'hoarfrost-cli-network-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function hoarfrost(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = runCli(args);
  return { status: r.code, stdout: r.stdout, stderr: r.stderr };
}

function write(name: string, text: string): string {
  const file = join(dir, name);
  writeFileSync(file, text);
  return file;
}

/** A stack trace line as Node prints it. */
const STACK_LINE = /^\s{4}at /m;

const GOOD = `format: hoarfrost-network 1
name: tiny
species:
  - {name: CO, binding_energy: 1150}
reactions:
  - {reactants: [H2], products: [H2+, e-], law: cosmic-ray, alpha: 1.2e-17}
  - {reactants: [H3+, CO], products: [HCO+, H2], law: arrhenius, alpha: 1.61e-9}
  - {reactants: [CO], products: [CO(s)], law: accretion}
  - {reactants: [CO(s)], products: [CO], law: thermal-desorption}
`;

describe('hoarfrost network check', () => {
  it('--derive counts, names and checks the reactions grain switches add; an unknown switch is a clear error', () => {
    const r = hoarfrost('network', 'check', 'config/networks/dark-cloud.yaml', '--derive', 'three_body,ice_photolysis', '--json');
    expect(r.status).toBe(0);
    const report = JSON.parse(r.stdout) as { errors: number; derived: { options: string[]; byMechanism: Record<string, number>; reactions: { mechanism: string; label: string }[]; notes: string[] } };
    expect(report.errors).toBe(0);
    expect(report.derived.options).toEqual(['three_body', 'ice_photolysis']);
    expect(Object.keys(report.derived.byMechanism).sort()).toEqual(['ice-photolysis', 'three-body']);
    expect(report.derived.reactions.map((d) => d.label)).toContain('three-body (H(s) + O(s) -> OH(s), then CO(s) + OH(s) -> CO2(s) + H(s))');
    expect(report.derived.notes.some((n) => n.startsWith('ice photolysis:'))).toBe(true);
    const bad = hoarfrost('network', 'check', 'config/networks/dark-cloud.yaml', '--derive', 'three_bodies');
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/unknown: three_bodies/);
    expect(bad.stderr).not.toMatch(STACK_LINE);
  });
  it('passes on the default network and prints the counts', () => {
    const r = hoarfrost('network', 'check', 'config/networks/dark-cloud.yaml');
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/network dark-cloud/);
    expect(r.stdout).toMatch(/^species\s+\d+ gas \d+/m);
    expect(r.stdout).toMatch(/^\s+arrhenius\s+\d+$/m);
    expect(r.stdout).toMatch(/^errors: 0$/m);
    expect(r.stdout).toMatch(/OK: no errors/);
  });

  it('--json is machine-readable', () => {
    const r = hoarfrost('network', 'check', '--json', 'config/networks/dark-cloud.yaml');
    expect(r.status).toBe(0);
    const report = JSON.parse(r.stdout);
    expect(report.errors).toBe(0);
    expect(report.counts.reactions.total).toBeGreaterThanOrEqual(500);
    expect(report.contentHash).toMatch(/^[0-9a-f]{64}$/);
  });

  it('exits 1 and lists the problems when the check finds errors; warnings alone exit 0', () => {
    const bad = write('unbalanced.yaml', GOOD + '  - {reactants: [H3+, CO], products: [HCO+, H], law: arrhenius, alpha: 1e-9}\n  - {reactants: [H3+, e-], products: [H2], law: arrhenius, alpha: 1e-9}\n');
    const r = hoarfrost('network', 'check', bad);
    expect(r.status).toBe(1);
    expect(r.stdout).toContain(`error [elements] ${bad}:10: elements not conserved`);
    expect(r.stdout).toContain(`error [elements] ${bad}:11:`);
    expect(r.stdout).toMatch(/FAILED: 2 errors/);
    const warned = hoarfrost('network', 'check', write('warned.yaml', GOOD));
    expect(warned.status).toBe(0);
    expect(warned.stdout).toMatch(/warning \[only-destroyed\]/);
  });

  const BAD: [string, string, string, RegExp][] = [
    ['malformed YAML', 'malformed.yaml', 'format: hoarfrost-network 1\nname: x\nreactions:\n  - {reactants: [H2\n', /malformed YAML/],
    ['an unknown key', 'unknown-key.yaml', GOOD.replace('law: accretion}', 'law: accretion, stickiness: 1}'), /unknown key 'stickiness'/],
    ['a wrong type', 'wrong-type.yaml', GOOD.replace('alpha: 1.61e-9', 'alpha: [1]'), /expected number, found a list/],
    ['a negative binding energy', 'negative.yaml', GOOD.replace('binding_energy: 1150', 'binding_energy: -3'), /binding energy must be a non-negative/],
    ['a missing rate parameter', 'missing.yaml', GOOD.replace(', alpha: 1.2e-17', ''), /missing the parameter 'alpha'/],
    ['an unknown species', 'species.yaml', GOOD.replace('[HCO+, H2]', '[HCO+, Hq2]'), /'Hq2' is not a species name/],
    ['an empty file', 'empty.yaml', '', /the file is empty/],
  ];
  it.each(BAD)('%s: a clear located error, exit 2, no stack trace', (_what, name, text, why) => {
    const file = write(name, text);
    const r = hoarfrost('network', 'check', file);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(why);
    expect(r.stderr).toContain(file);
    expect(r.stderr).not.toMatch(STACK_LINE);
    expect(r.stderr).not.toMatch(/internal error/);
  });

  it('a CSV with a short row names the row; the mapping can be given with --mapping', () => {
    const mapping = write('cols.yaml', `format: hoarfrost-network-table 1
name: t
columns:
  reactants: [r1, r2]
  products: [p1, p2]
  law: law
  parameters: {alpha: alpha}
species:
  - {name: CO, binding_energy: 1150}
`);
    const table = write('t.csv', 'r1,r2,p1,p2,law,alpha\nH2,,H2+,e-,cosmic-ray,1.2e-17\nH3+,CO,HCO+,H2,arrhenius\n');
    const r = hoarfrost('network', 'check', table, '--mapping', mapping);
    expect(r.status).toBe(2);
    expect(r.stderr).toContain(`${table}:3, row 2: this row has 5 cells, expected 6`);
    expect(r.stderr).not.toMatch(STACK_LINE);
    writeFileSync(table, 'r1,r2,p1,p2,law,alpha\nH2,,H2+,e-,cosmic-ray,1.2e-17\nH3+,CO,HCO+,H2,arrhenius,1.6e-9\n');
    expect(hoarfrost('network', 'check', table, '--mapping', mapping).status).toBe(0);
  });

  it('a missing file', () => {
    const r = hoarfrost('network', 'check', join(dir, 'absent.yaml'));
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/not found/);
    expect(r.stderr).not.toMatch(STACK_LINE);
  });
});
