/**
 * Bad input through the real command line: each case a file or an option a
 * user could really give, answered with a located, readable error (file,
 * line, field, what was expected), exit 2, no stack trace, nothing written.
 * Most cases fail while the pipeline file is read, so each process is short.
 *
 * Hostile input and faults whose reproduction needs more than one command
 * line are tested beside their code: mutated FITS headers
 * (test/obs/fits-fuzz.test.ts), two processes taking over the run lock
 * (test/grid/run-lock.test.ts), a full, read-only or forbidden disk under
 * the output writer (test/config/write.test.ts) and under the grid's batch
 * flush (test/grid/pool.test.ts), a run with nothing to do
 * (test/pipeline/runner.test.ts), rate coefficients over their temperature
 * range (test/chem/rate-bounds.test.ts).
 */
import { existsSync, lstatSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BIN, ROOT, expectNoStack, runCli, type CliResult } from '../support/cli.ts';

const NETWORK = join(ROOT, 'config/networks/dark-cloud.yaml');

/** A pipeline that reads well: one fixed model, no observations. */
const GOOD = `name: bad-input
network: ${NETWORK}
output: out
conditions:
  density: 1.0e4
  gas_temperature: 10
  visual_extinction: 5
times: { start_yr: 1.0e3, end_yr: 1.0e7, count: 9 }
`;

let dir: string;

/** Write `GOOD` with one text replaced, as NAME.yaml in the scratch folder. */
function pipeline(name: string, from: string, to: string): string {
  expect(GOOD).toContain(from);
  const file = join(dir, `${name}.yaml`);
  writeFileSync(file, GOOD.replace(from, to));
  return `${name}.yaml`;
}

function refused(args: string[]): CliResult {
  const r = runCli(args, dir);
  expect(r.code, r.stderr).toBe(2);
  expectNoStack(r.stderr);
  return r;
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'hoarfrost-bad-input-'));
});

afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
});

describe('files that are not what they should be', () => {
  it('a binary pipeline file is refused as binary, without echoing its bytes', () => {
    writeFileSync(join(dir, 'binary.yaml'), Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0x00, 0x00, 0xff, 0xfe, 0x41]));
    const r = refused(['grid', 'binary.yaml', '--status']);
    expect(r.stderr).toContain('binary.yaml: expected a text pipeline file, found binary data (a zero byte at byte 9)');
    expect(r.stderr).not.toMatch(/[\u0000-\u0008\ufffd]/);
  });

  it('a binary network file is refused as binary by network check', () => {
    writeFileSync(join(dir, 'binary-network.yaml'), Buffer.from([0x66, 0x6f, 0x00, 0x01, 0x02]));
    const r = refused(['network', 'check', 'binary-network.yaml']);
    expect(r.stderr).toContain('binary-network.yaml: expected a text network file, found binary data (a zero byte at byte 3)');
  });

  it('an observation table that is not UTF-8 (Latin-1) is refused, not read with replacement characters', () => {
    writeFileSync(join(dir, 'latin1.csv'), Buffer.concat([Buffer.from('star,av\nM'), Buffer.from([0xe9]), Buffer.from('ne,5\n')]));
    const r = refused(['observations', 'latin1.csv']);
    expect(r.stderr).toContain('latin1.csv: expected a text observation table in UTF-8, found bytes that are not UTF-8. Save the file as UTF-8 text');
  });
});

/** Nine aliases per level, six levels: 9^6 copies if expanded. */
const ALIAS_BOMB = ['a0: &a0 [x, x, x, x, x, x, x, x, x]', ...[1, 2, 3, 4, 5, 6].map((k) => `a${k}: &a${k} [${Array(9).fill(`*a${k - 1}`).join(', ')}]`), ''].join('\n');

describe('files built to exhaust the reader', () => {
  it('an alias bomb in a pipeline file is a located error, not an internal error', () => {
    writeFileSync(join(dir, 'bomb.yaml'), GOOD + ALIAS_BOMB);
    const r = refused(['grid', 'bomb.yaml', '--status']);
    expect(r.stderr).toContain('bomb.yaml:10: the aliases (*name) of this file expand to more than 1000 copies of values');
  });

  it('an alias bomb in a network file is a located error', () => {
    writeFileSync(join(dir, 'bomb-network.yaml'), `format: hoarfrost-network 1\nname: bomb\n${ALIAS_BOMB}`);
    const r = refused(['network', 'check', 'bomb-network.yaml']);
    expect(r.stderr).toContain('bomb-network.yaml:4: the aliases (*name) of this file expand to more than 1000 copies');
  });

  it('a VOTable with an external entity is refused at its DOCTYPE line; the entity is never read', () => {
    writeFileSync(join(dir, 'xxe.vot'), '<?xml version="1.0"?>\n<!DOCTYPE VOTABLE [<!ENTITY x SYSTEM "file:///etc/hostname">]>\n<VOTABLE><RESOURCE><TABLE><FIELD name="id" datatype="char" arraysize="*"/><DATA><TABLEDATA><TR><TD>&x;</TD></TR></TABLEDATA></DATA></TABLE></RESOURCE></VOTABLE>\n');
    const r = refused(['observations', 'xxe.vot']);
    expect(r.stderr).toContain('xxe.vot:2: the file declares a DOCTYPE');
  });
});

describe('pipeline values of the wrong kind', () => {
  it('malformed YAML gives the parser problem once, with its column, and no dangling colon', () => {
    writeFileSync(join(dir, 'tabs.yaml'), 'name: x\n\tnetwork: y\n');
    const r = refused(['grid', 'tabs.yaml', '--status']);
    expect(r.stderr).toBe('hoarfrost: tabs.yaml:2: malformed YAML: Tabs are not allowed as indentation (column 1).\n');
  });


  it('a condition that is a word says which forms a condition takes', () => {
    const r = refused(['grid', pipeline('word', 'gas_temperature: 10', 'gas_temperature: warm'), '--status']);
    expect(r.stderr).toContain("word.yaml:6, field 'conditions.gas_temperature': expected a finite number, a list of numbers, a range { from, to, count }, a tie { tie: NAME } or, for visual_extinction, layers { layers: slab } (found the text 'warm')");
  });

  it('a range with a fractional count names the count, not the whole condition', () => {
    const r = refused(['grid', pipeline('fraction', 'density: 1.0e4', 'density: { from: 1.0e3, to: 1.0e5, count: 2.5 }'), '--status']);
    expect(r.stderr).toContain("fraction.yaml:5, field 'conditions.density.count': expected int, found number 2.5.");
  });

  it('output times with start after end name the file and line', () => {
    const r = refused(['grid', pipeline('times', 'start_yr: 1.0e3, end_yr: 1.0e7', 'start_yr: 1.0e7, end_yr: 1.0e3'), '--status']);
    expect(r.stderr).toContain("times.yaml:8, field 'times.end_yr': output times need start_yr < end_yr; swap them");
  });

  it('an initial composition that is a number says which forms it takes', () => {
    const r = refused(['grid', pipeline('initial-number', 'times:', 'initial: 5\ntimes:'), '--status']);
    expect(r.stderr).toContain("initial-number.yaml:8, field 'initial': expected a preset name (low-metal), a path to a composition file, a mapping of species to fractional abundances, or { first_stage: { from, age_yr, conditions } } (found number 5).");
  });

  it('an unknown initial composition preset names the file and line', () => {
    const r = refused(['grid', pipeline('preset', 'times:', 'initial: low-metals\ntimes:'), '--status']);
    expect(r.stderr).toContain("preset.yaml:8, field 'initial': unknown initial composition preset 'low-metals'. Known presets: low-metal");
  });

  it('a figure name that leaves the output folder is refused when the file is read, before any model runs', () => {
    const r = refused(['grid', pipeline('figure', 'times:', 'report:\n  figures:\n    - { kind: tracks, name: ../../escaped }\ntimes:'), '--status']);
    expect(r.stderr).toContain("figure.yaml:10, field 'report.figures[0].name': the output name '../../escaped' is not allowed");
  });
});

describe('output folders that cannot be written', () => {
  it('an output folder that is a file stops grid before it starts, naming the pipeline line', () => {
    writeFileSync(join(dir, 'taken'), 'a file the user keeps\n');
    const r = refused(['grid', pipeline('taken', 'output: out', 'output: taken/out'), '--workers', '1']);
    expect(r.stderr).toContain("taken.yaml:3, field 'output': expected a folder, but");
    expect(r.stderr).toContain('is a file. Give another output path, or move the file away.');
  });

  it('an output folder that cannot be made (under /sys) is said so, not called an internal error', () => {
    const r = refused(['slurm', pipeline('proc', 'output: out', 'output: /sys/hoarfrost-no-such/out'), '--shards', '1']);
    expect(r.stderr).toContain('/sys/hoarfrost-no-such/out/slurm: cannot mkdir: operation not permitted. Check that you may write there');
  });
});

describe('observation files', () => {
  it('a sightline with a blank name is named after its line, with a warning saying so', () => {
    writeFileSync(join(dir, 'unnamed.csv'), 'star,av,N(H2O(s)),N(H2O(s))_err\nAX-1,5.0,2e17,5e16\n,6.0,3e17,5e16\n');
    const r = runCli(['observations', 'unnamed.csv'], dir);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain("unnamed.csv, line 3, column 'star': the sightline has no name; it is called 'line-3' in the results.");
  });

  it('a reference species the observations lack is one problem, however many ratios ask for it', () => {
    writeFileSync(join(dir, 'ratios.csv'), 'star,av,N(H2O(s)),N(H2O(s))_err,N(CO(s)),N(CO(s))_err,N(CO2(s)),N(CO2(s))_err\nAX-1,5.0,2e17,5e16,4e16,1e16,3e16,1e16\n');
    const body = GOOD.replace('visual_extinction: 5', 'visual_extinction: { tie: sightlines, step: 1 }');
    writeFileSync(join(dir, 'ratios.yaml'), `${body}observations: { file: ratios.csv, reference: CH3OH(s) }\nfit:\n  quantities:\n    - { species: CO(s), as: ratio }\n    - { species: CO2(s), as: ratio }\n`);
    const r = refused(['run', 'ratios.yaml']);
    expect(r.stderr.match(/ratios to the reference 'CH3OH\(s\)' are asked for/g)).toHaveLength(1);
  });

  it('a FITS file with a negative NAXIS1 is refused at once, naming the keyword (the header offset never moves backwards)', () => {
    const card = (text: string) => text.padEnd(80);
    const header = [card('SIMPLE  =                    T'), card('BITPIX  =                  -64'), card('NAXIS   =                    2'), card('NAXIS1  =              -100000'), card('NAXIS2  =                    1'), card('END')].join('');
    writeFileSync(join(dir, 'negative.fits'), header.padEnd(2880));
    const r = refused(['observations', 'negative.fits']);
    expect(r.stderr).toContain("negative.fits, field 'NAXIS1': primary HDU: NAXIS1 = -100000 is out of range: expected a whole number >= 0 (FITS Standard 4.0 §4.4.1).");
  });

  it('a YAML sightline list with .inf is refused with its line, as the CSV reader refuses 1e400', () => {
    writeFileSync(join(dir, 'inf.yaml'), 'sightlines:\n  - id: AX-1\n    av: 5\n    columns:\n      H2O(s): { value: .inf, error: 5e16 }\n');
    const r = refused(['observations', 'inf.yaml']);
    expect(r.stderr).toContain("inf.yaml:5, field 'H2O(s).value': expected a finite number, found infinity");
  });

  it('terminal control sequences in sightline names never reach the terminal (clear screen, OSC title and link, C1 CSI, bidi override)', () => {
    const names = ['AX-\u001b[2J\u001b[H1', 'AX-\u001b]0;owned\u0007-2', 'AX-\u001b]8;;https://example.invalid\u001b\\3\u001b]8;;\u001b\\', 'AX-\u009b31m4', 'AX-\u202e5'];
    writeFileSync(join(dir, 'control.csv'), `star,av,N(H2O(s)),N(H2O(s))_err\n${names.map((n, i) => `"${n}",${5 + i},2e17,5e16`).join('\n')}\n`);
    const CONTROL = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/;
    for (const args of [['observations', 'control.csv'], ['observations', 'control.csv', '--json']]) {
      const r = runCli(args, dir);
      expect(r.stdout + r.stderr).toContain('AX-');
      expect(r.stdout).not.toMatch(CONTROL);
      expect(r.stderr).not.toMatch(CONTROL);
    }
    writeFileSync(join(dir, 'control-bad.csv'), 'star,av,N(H2O(s)),N(H2O(s))_err\nAX-1,5,\u001b[2Jlots,5e16\n');
    const r = refused(['observations', 'control-bad.csv']);
    expect(r.stderr).toContain("cannot read '?[2Jlots'");
    expect(r.stderr).not.toMatch(CONTROL);
  });

  it('a VOTable cut short names the elements left open, in words', () => {
    writeFileSync(join(dir, 'cut.vot'), '<?xml version="1.0"?>\n<VOTABLE version="1.4">\n<RESOURCE><TABLE>\n<FIELD name="id" datatype="char" arraysize="*"/>\n<DATA><TABLEDATA><TR><TD>a</TD></TR>\n');
    const r = refused(['observations', 'cut.vot']);
    expect(r.stderr).toContain('not well-formed XML: the elements <VOTABLE>, <RESOURCE>, <TABLE>, <DATA>, <TABLEDATA> are never closed; the file may have been cut short.');
  });
});

describe('networks with impossible rate coefficients', () => {
  it('network check refuses alpha = 1e300 (beyond the capture limit) and beta = -1000, gamma = -50000 (not finite), naming each reaction', () => {
    writeFileSync(join(dir, 'wild.yaml'), 'format: hoarfrost-network 1\nname: wild\nspecies:\n  - {name: CO, binding_energy: 1150}\nreactions:\n  - {reactants: [H3+, CO], products: [HCO+, H2], law: arrhenius, alpha: 1.0e300, temperature: [10, 300]}\n  - {reactants: [HCO+, e-], products: [CO, H], law: arrhenius, alpha: 1.0e-7, beta: -1000, gamma: -50000, temperature: [10, 300]}\n');
    const r = runCli(['network', 'check', 'wild.yaml'], dir);
    expect(r.code, r.stderr).toBe(1);
    expect(r.stdout).toContain('H3+ + CO -> HCO+ + H2 (arrhenius): k = 1e+300 cm^3 s^-1 at 10 K exceeds 1e-6 cm^3 s^-1');
    expect(r.stdout).toContain('HCO+ + e- -> CO + H (arrhenius): k is not finite (Infinity) at 10 K');
  });
});

describe('resources asked for beyond the machine', () => {
  it('a range of a billion values is refused at its count before any value is built', () => {
    const r = refused(['grid', pipeline('billion', 'density: 1.0e4', 'density: { from: 1.0e3, to: 1.0e5, count: 1000000000 }'), '--status']);
    expect(r.stderr).toContain("billion.yaml:5, field 'conditions.density.count': a range of 1000000000 values is more than the 1000000 grid points allowed (HOARFROST_MAX_GRID_POINTS raises the limit).");
  });

  it('a grid over the point limit is refused before it is planned, and the limit can be changed through the environment', () => {
    const big = pipeline('big', 'density: 1.0e4', 'density: { from: 1.0e3, to: 1.0e5, count: 2000 }\n  dust_temperature: { from: 8, to: 20, count: 1000 }');
    const r = refused(['grid', big, '--status']);
    expect(r.stderr).toContain('the grid would have 2000000 points, more than the 1000000 allowed');
    // A computing centre may lower the limit (or a user raise it) through the environment.
    const modest = pipeline('modest', 'density: 1.0e4', 'density: { from: 1.0e3, to: 1.0e5, count: 20 }\n  dust_temperature: { from: 8, to: 20, count: 10 }');
    const lowered = spawnSync(process.execPath, [BIN, 'grid', modest, '--status'], { cwd: dir, encoding: 'utf8', env: { ...process.env, HOARFROST_MAX_GRID_POINTS: '100' } });
    expect(lowered.status).toBe(2);
    expect(lowered.stderr).toContain('the grid would have 200 points, more than the 100 allowed (HOARFROST_MAX_GRID_POINTS raises the limit)');
  });

  it('a hundred million output times are refused when the pipeline is read', () => {
    const r = refused(['grid', pipeline('times-count', 'count: 9', 'count: 100000000'), '--status']);
    expect(r.stderr).toContain("times-count.yaml:8, field 'times.count'");
    expect(r.stderr).toContain('10000');
  });

  it('a sightline name of 2,000 characters is refused with its line and column', () => {
    writeFileSync(join(dir, 'long-name.csv'), `star,av,N(H2O(s)),N(H2O(s))_err\n${'A'.repeat(2000)},5.0,2e17,5e16\n`);
    const r = refused(['observations', 'long-name.csv']);
    expect(r.stderr).toContain("long-name.csv:2, field 'star': a cell of 2000 characters; cells hold at most 1000");
  });

  it('an observation table with more rows than the limit is refused, and a text file past the size limit before it is read', () => {
    writeFileSync(join(dir, 'rows.csv'), `star,av,N(H2O(s)),N(H2O(s))_err\n${Array.from({ length: 20 }, (_, i) => `AX-${i},5.0,2e17,5e16`).join('\n')}\n`);
    const rows = spawnSync(process.execPath, [BIN, 'observations', 'rows.csv'], { cwd: dir, encoding: 'utf8', env: { ...process.env, HOARFROST_MAX_OBSERVATION_ROWS: '10' } });
    expect(rows.status).toBe(2);
    expect(rows.stderr).toContain('rows.csv: the table has 20 rows, more than the 10 allowed (HOARFROST_MAX_OBSERVATION_ROWS raises the limit).');
    const bytes = spawnSync(process.execPath, [BIN, 'observations', 'rows.csv'], { cwd: dir, encoding: 'utf8', env: { ...process.env, HOARFROST_MAX_OBSERVATION_BYTES: '100' } });
    expect(bytes.status).toBe(2);
    expect(bytes.stderr).toMatch(/rows\.csv: the file has \d+ bytes, more than the 100 allowed for an observation text file \(HOARFROST_MAX_OBSERVATION_BYTES raises the limit\)/);
  });

  it('--workers 1000 runs on the cores, with a note saying so', () => {
    const r = runCli(['grid', pipeline('workers', 'output: out', 'output: out-workers'), '--workers', '1000'], dir);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout + r.stderr).toMatch(/on 1 worker \(--workers 1000 is more than the \d+ cores this process may use; running \d+ at most\)/);
  });
});

describe('model stores', () => {
  it('merge of a store that is a folder says so, not "disk I/O error"', () => {
    mkdirSync(join(dir, 'shard-folder.sqlite'), { recursive: true });
    const r = refused(['merge', pipeline('merge', 'times:', 'times:'), 'shard-folder.sqlite']);
    expect(r.stderr).toContain('shard-folder.sqlite: expected a model store file (.sqlite), found a folder.');
  });
});

describe('lock files', () => {
  it('--lock naming a folder is refused before the run, not after it', () => {
    mkdirSync(join(dir, 'locks'), { recursive: true });
    const r = refused(['run', pipeline('lock', 'times:', 'times:'), '--lock', 'locks']);
    expect(r.stderr).toContain('locks: --lock needs a file name, and this is a folder.');
    expect(r.stdout).toBe('');
  });

  it('--lock in a folder that does not exist is refused before the run', () => {
    const r = refused(['run', pipeline('lock', 'times:', 'times:'), '--lock', 'no-such-folder/run.lock.json']);
    expect(r.stderr).toContain('--lock: the folder');
    expect(r.stderr).toContain('no-such-folder does not exist.');
  });

  it('--check naming a folder says it is a folder, not that it is missing', () => {
    mkdirSync(join(dir, 'locks'), { recursive: true });
    const r = refused(['run', pipeline('lock', 'times:', 'times:'), '--check', 'locks']);
    expect(r.stderr).toContain('locks: expected a lock file, found a folder.');
  });
});

describe('planted symlinks and special folders', () => {
  it('a symlink planted at an output file is replaced, and the file it pointed to is left alone', () => {
    const precious = join(dir, 'precious.txt');
    writeFileSync(precious, 'not yours to overwrite\n');
    mkdirSync(join(dir, 'out-link/slurm'), { recursive: true });
    const file = pipeline('link', 'output: out', 'output: out-link');
    symlinkSync(precious, join(dir, 'out-link/slurm/grid-array.sh'));
    const r = runCli(['slurm', file, '--shards', '1'], dir);
    expect(r.code, r.stderr).toBe(0);
    expect(readFileSync(precious, 'utf8')).toBe('not yours to overwrite\n');
    expect(lstatSync(join(dir, 'out-link/slurm/grid-array.sh')).isSymbolicLink()).toBe(false);
  });

  it('init in /proc is refused at once instead of hanging', () => {
    const r = refused(['init', '/proc/hoarfrost-project']);
    expect(r.stderr).toContain('/proc/hoarfrost-project: is on the proc file system, a window onto the kernel, not a disk');
  });
});

describe('init', () => {
  it('refuses an empty folder name instead of filling the current folder', () => {
    const cwd = join(dir, 'init-here');
    mkdirSync(cwd);
    const r = runCli(['init', ''], cwd);
    expect(r.code).toBe(2);
    expectNoStack(r.stderr);
    expect(r.stderr).toContain("the folder name is empty; give the folder to make, e.g. 'hoarfrost init my-survey'");
    expect(existsSync(cwd) && readdirSync(cwd)).toEqual([]);
  });
});
