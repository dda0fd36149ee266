/**
 * Mutated headers of the project's own FITS files (the two example maps and a
 * binary table from the project's writer): every case must end in a located
 * UserError or a valid read, never a loop, a crash or another exception.
 * The header values that move an offset are the ones FITS Standard 4.0
 * §4.4.1 bounds (BITPIX, NAXIS 0-999, NAXISn >= 0, PCOUNT >= 0, GCOUNT);
 * they are the main targets, with random byte changes and truncation beside.
 */
import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readFitsObservations } from '../../src/obs/fits-obs.ts';
import { readFits } from '../../src/obs/fits-read.ts';
import { encodeFits, FITS_BLOCK, FITS_CARD } from '../../src/report/fits.ts';
import { UserError } from '../../src/config/errors.ts';
import { ROOT } from '../support/cli.ts';
import { scratch } from './helpers.ts';

const dir = scratch('hoarfrost-fits-fuzz-');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const SOURCES: [string, Uint8Array][] = [
  ['demo-map', new Uint8Array(readFileSync(join(ROOT, 'pipelines/demo/map.fits')))],
  ['frostmere-map', new Uint8Array(readFileSync(join(ROOT, 'pipelines/examples/frostmere-map.fits')))],
  [
    'table',
    encodeFits([
      {
        type: 'table',
        name: 'OBS',
        columns: [
          { name: 'star', data: ['AX-1', 'AX-2', 'AX-3'] },
          { name: 'av', data: new Float64Array([5, 6, 7]), unit: 'mag' },
          { name: 'N(H2O(s))', data: new Float64Array([2e17, 3e17, 4e17]), unit: 'cm-2' },
          { name: 'count', data: new Int32Array([1, 2, 3]) },
        ],
      },
    ]),
  ],
];

/** Deterministic uniform numbers in [0, 1) (a linear congruential generator, Numerical Recipes' constants). */
function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

/** Where each header card of a file starts, with its keyword. */
function headerCards(bytes: Uint8Array): { at: number; key: string }[] {
  const out: { at: number; key: string }[] = [];
  let o = 0;
  for (const h of readFits('source', bytes).hdus) {
    for (let p = h.headerOffset; p < h.dataOffset; p += FITS_CARD) {
      const key = String.fromCharCode(...bytes.subarray(p, p + 8)).trimEnd();
      if (key !== '') out.push({ at: p, key });
    }
    o = h.dataOffset;
  }
  expect(o).toBeGreaterThan(0);
  return out;
}

const STRUCTURAL = /^(BITPIX|NAXIS\d*|PCOUNT|GCOUNT|TFIELDS|TFORM\d+|TTYPE\d+|BSCALE|BZERO|BLANK|XTENSION|EXTNAME|TSCAL\d+|TZERO\d+|TNULL\d+)$/;
const VALUES = ['-1', '-2880', '-2147483648', '0', '1', '2', '3', '2880', '2147483647', '4294967296', '9007199254740993', '1E300', '1.5', '-0.5', 'abc', 'T', "'X'", "'1000000000D'", "'-3E'", ''];

function setValue(bytes: Uint8Array, at: number, value: string): void {
  const text = value.startsWith("'") ? value.padEnd(20) : value.padStart(20);
  for (let i = 0; i < 20; i++) bytes[at + 10 + i] = text.charCodeAt(i);
}

interface Outcome {
  read: number;
  located: number;
}

function tryCase(name: string, bytes: Uint8Array, outcome: Outcome): void {
  const file = join(dir, `${name}.fits`);
  writeFileSync(file, bytes);
  try {
    readFitsObservations(file, undefined);
    outcome.read++;
  } catch (e) {
    if (!(e instanceof UserError)) throw new Error(`case ${name}: ${(e as Error).stack ?? String(e)}`);
    expect(e.location.file, `case ${name}: ${e.message}`).toBe(file);
    outcome.located++;
  }
}

describe('mutated FITS headers end in a located error or a valid read', () => {
  for (const [label, source] of SOURCES) {
    it(`${label}: structural keywords set to hostile values, bytes changed, files cut`, () => {
      const random = rng(label.length * 7919 + source.length);
      const cards = headerCards(source);
      const structural = cards.filter((c) => STRUCTURAL.test(c.key));
      expect(structural.length).toBeGreaterThan(5);
      const outcome: Outcome = { read: 0, located: 0 };
      const cases = 120;
      for (let n = 0; n < cases; n++) {
        const bytes = source.slice();
        const kind = n % 4;
        if (kind <= 1) {
          // One or two structural values changed at once.
          for (let k = 0; k <= kind; k++) {
            const c = structural[Math.floor(random() * structural.length)];
            setValue(bytes, c.at, VALUES[Math.floor(random() * VALUES.length)]);
          }
        } else if (kind === 2) {
          // A few header bytes changed to any byte value.
          for (let k = 0; k < 3; k++) {
            const c = cards[Math.floor(random() * cards.length)];
            bytes[c.at + Math.floor(random() * FITS_CARD)] = Math.floor(random() * 256);
          }
        } else {
          // Cut at a block boundary, after a structural value was changed.
          const c = structural[Math.floor(random() * structural.length)];
          setValue(bytes, c.at, VALUES[Math.floor(random() * VALUES.length)]);
          const blocks = bytes.length / FITS_BLOCK;
          tryCase(`${label}-${n}`, bytes.subarray(0, FITS_BLOCK * (1 + Math.floor(random() * (blocks - 1)))), outcome);
          continue;
        }
        tryCase(`${label}-${n}`, bytes, outcome);
      }
      expect(outcome.read + outcome.located).toBe(cases);
      // Both ends are reached: the mutations are not all harmless nor all fatal.
      expect(outcome.located).toBeGreaterThan(0);
      expect(outcome.read).toBeGreaterThan(0);
    });
  }

  it('a negative NAXIS1 in the primary header or an image extension is refused, naming the keyword', () => {
    for (const [label, source] of SOURCES.slice(0, 2)) {
      const naxis1 = headerCards(source).filter((c) => c.key === 'NAXIS1');
      for (const [i, c] of naxis1.slice(0, 2).entries()) {
        const bytes = source.slice();
        setValue(bytes, c.at, '-1');
        const file = join(dir, `${label}-negative-${i}.fits`);
        writeFileSync(file, bytes);
        expect(() => readFits(file)).toThrow(/NAXIS1 = -1 is out of range: expected a whole number >= 0/);
      }
    }
  });
});
