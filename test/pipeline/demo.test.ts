/** The demo's data (pipelines/demo/): invented, said so in every header, and shaped as the demo promises. */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadNetwork } from '../../src/chem/network.ts';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { observationsSection } from '../../src/config/sections/observations.ts';
import { deriveQuantities, loadObservations } from '../../src/obs/index.ts';

const ROOT = join(import.meta.dirname, '../..');
const DEMO = join(ROOT, 'pipelines/demo.yaml');
const ICES = ['H2O(s)', 'CO(s)', 'CO2(s)', 'CH3OH(s)', 'NH3(s)', 'CH4(s)'];

describe('the demo data', () => {
  const pipeline = loadPipeline(DEMO);
  const network = loadNetwork(pipeline.resolvePath(pipeline.config.network));
  const known = new Set(network.species.map((s) => s.name));

  it('says it is invented in the header of every file', () => {
    for (const f of ['sightlines.csv', 'sightlines.columns.yaml', 'truth.csv', 'map.columns.yaml']) {
      expect(readFileSync(join(ROOT, 'pipelines/demo', f), 'utf8'), f).toMatch(/^# INVENTED DEMO DATA: the Elsinmoor Cloud is not a real object/);
    }
    const fitsHeader = readFileSync(join(ROOT, 'pipelines/demo/map.fits')).subarray(0, 2880 * 2).toString('latin1');
    expect(fitsHeader).toContain("OBJECT  = 'Elsinmoor Cloud'");
    expect(fitsHeader).toMatch(/COMMENT INVENTED DEMO DATA/);
  });

  it('has about a dozen background stars with A_V of 4 to 30 mag, six ices, gas CO and two tracers, and some limits', () => {
    const set = loadObservations(pipeline.config.observations!, pipeline.dir, known);
    expect(set.sightlines).toHaveLength(12);
    const av = set.sightlines.map((s) => s.av!);
    expect(Math.min(...av)).toBeGreaterThanOrEqual(4);
    expect(Math.max(...av)).toBeLessThanOrEqual(30);
    const species = new Set(set.sightlines.flatMap((s) => Object.keys(s.columns)));
    for (const sp of [...ICES, 'CO', 'N2H+', 'HCO+']) expect(species.has(sp), sp).toBe(true);
    const limits = set.sightlines.flatMap((s) => Object.values(s.columns)).filter((m) => m.kind === 'upper');
    expect(limits.length).toBeGreaterThanOrEqual(5);
    // Every quantity the demo fits is there for most stars.
    const { quantities } = deriveQuantities(set, pipeline.config.observations!, pipeline.config.fit!.quantities);
    expect(quantities.length).toBeGreaterThanOrEqual(12 * 6);
  });

  it('has a 32 x 32 FITS map set of the same cloud with an A_V image and ice and CO columns, WCS kept', () => {
    const section = observationsSection.parse({ file: 'demo/map.fits', columns_file: 'demo/map.columns.yaml' });
    const set = loadObservations(section, pipeline.dir, known);
    expect(set.kind).toBe('map');
    expect(set.map?.nx).toBe(32);
    expect(set.map?.ny).toBe(32);
    expect(set.map?.wcs.CTYPE1).toBe('RA---TAN');
    const species = new Set(set.sightlines.flatMap((s) => Object.keys(s.columns)));
    for (const sp of ['H2O(s)', 'CO(s)', 'CO']) expect(species.has(sp), sp).toBe(true);
    const av = set.sightlines.map((s) => s.av).filter((a): a is number => a !== undefined);
    expect(Math.max(...av)).toBeGreaterThan(20);
    expect(Math.min(...av)).toBeLessThan(4);
  });
});
