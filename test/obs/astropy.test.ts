/**
 * FITS against a general-purpose reference library: Debian's python3-astropy
 * (/usr/bin/python3, astropy.io.fits). Astropy reads and verifies the files
 * our writer makes (hdul.verify('exception') raises on any breach of the
 * standard it checks), and writes files (float and scaled-integer images,
 * the unsigned-16 convention, binary tables, a map set with a WCS from
 * astropy.wcs) that our reader must read to the same numbers. Python runs
 * once for the whole file. With HOARFROST_REQUIRE_ASTROPY=1 (CI) a missing
 * astropy fails the test; otherwise the tests are skipped with a message.
 */
import { spawnSync } from 'node:child_process';
import { beforeAll, expect, it } from 'vitest';
import { writeFitsImages, writeFitsTable } from '../../src/report/fits.ts';
import { readFits, readFitsImage, readFitsBinaryTable } from '../../src/obs/fits-read.ts';
import { loadObservations } from '../../src/obs/load.ts';
import { ASTROPY, describeWithReference, PYTHON } from '../support/references.ts';
import { scratch, section, write } from './helpers.ts';


const SCRIPT = String.raw`
import json, sys, math
import numpy as np
from astropy.io import fits
from astropy.wcs import WCS

d = sys.argv[1]
def clean(v):
    if isinstance(v, (float, np.floating)):
        v = float(v)
        return None if math.isnan(v) else v
    if isinstance(v, (np.integer,)):
        return int(v)
    if isinstance(v, (np.bool_, bool)):
        return bool(v)
    if isinstance(v, bytes):
        return v.decode()
    return v
out = {}

# 1. Our files, read and verified by astropy.
with fits.open(d + '/ours-images.fits', do_not_scale_image_data=True) as h:
    h.verify('exception')
    out['ours_images'] = [{'name': x.name, 'bitpix': x.header['BITPIX'], 'shape': list(x.data.shape),
                           'raw': [clean(v) for v in x.data.ravel(order='C')],
                           'bscale': x.header.get('BSCALE', 1), 'bzero': x.header.get('BZERO', 0), 'blank': x.header.get('BLANK')} for x in h]
    out['ours_header'] = {k: clean(h[0].header[k]) for k in ['CTYPE1', 'CRVAL1', 'CDELT1', 'OBSERVER', 'BUNIT']}
with fits.open(d + '/ours-table.fits') as h:
    h.verify('exception')
    t = h[1]
    out['ours_table'] = {'name': t.name, 'columns': {c.name: {'format': c.format, 'unit': c.unit, 'values': [clean(v) for v in t.data[c.name]]} for c in t.columns}}

# 2. Files astropy writes, with the values our reader must find.
rng = np.random.default_rng(7)
f64 = rng.uniform(1e16, 1e18, (4, 5)); f64[1, 2] = np.nan
f32 = rng.uniform(0, 30, (4, 5)).astype(np.float32); f32[0, 0] = np.nan
u16 = np.arange(20, dtype=np.uint16).reshape(4, 5) * 3000
i32 = (np.arange(20, dtype=np.int32).reshape(4, 5) - 10) * 100000000
u8 = np.arange(20, dtype=np.uint8).reshape(4, 5) * 12
scaled = fits.ImageHDU(data=rng.uniform(-50, 50, (4, 5)), name='SCALED')
scaled.scale('int16', bscale=0.01, bzero=3.0)
blanked = fits.ImageHDU(data=i32.copy(), name='BLANKED'); blanked.header['BLANK'] = int(i32[2, 3])
fits.HDUList([fits.PrimaryHDU(f64), fits.ImageHDU(f32, name='F32'), fits.ImageHDU(u16, name='U16'), scaled, blanked, fits.ImageHDU(u8, name='U8')]).writeto(d + '/astropy-images.fits', overwrite=True)
expected = []
with fits.open(d + '/astropy-images.fits', do_not_scale_image_data=True) as h:
    for x in h:
        raw = x.data.astype(np.float64)
        phys = raw * x.header.get('BSCALE', 1) + x.header.get('BZERO', 0)
        if 'BLANK' in x.header:
            phys[x.data == x.header['BLANK']] = np.nan
        expected.append({'name': x.name, 'bitpix': x.header['BITPIX'], 'bzero': x.header.get('BZERO', 0), 'values': [clean(v) for v in phys.ravel(order='C')]})
out['astropy_images'] = expected

cols = [fits.Column(name='id', format='8A', array=np.array(['cA-1', 'cA-2', 'cA-3'])),
        fits.Column(name='AV', format='D', unit='mag', array=np.array([5.25, 11.0, 17.125])),
        fits.Column(name='AV_err', format='E', unit='mag', array=np.array([0.5, 0.75, 1.0], dtype=np.float32)),
        fits.Column(name='N(H2O(s))', format='D', unit='cm-2', array=np.array([3.3e17, 1.0123456789012345e18, 1.7e18])),
        fits.Column(name='N(H2O(s))_err', format='D', unit='cm-2', array=np.array([3e16, 8e16, 1.1e17])),
        fits.Column(name='count', format='K', array=np.array([1, -2, 2**40])),
        fits.Column(name='j', format='J', array=np.array([-7, 0, 2**31 - 1]))]
fits.BinTableHDU.from_columns(cols, name='ICES').writeto(d + '/astropy-table.fits', overwrite=True)
with fits.open(d + '/astropy-table.fits') as h:
    out['astropy_table'] = {c.name: [clean(v) for v in h[1].data[c.name]] for c in h[1].columns}

w = WCS(naxis=2)
w.wcs.ctype = ['RA---TAN', 'DEC--TAN']; w.wcs.crpix = [3.0, 2.5]; w.wcs.crval = [70.15, 25.82]; w.wcs.cdelt = [-0.0025, 0.0025]; w.wcs.cunit = ['deg', 'deg']
wh = w.to_header()
av = np.array([[4.0, 6.5, 9.0, 6.5, 4.0], [6.5, 12.0, 20.0, 12.0, 6.5], [4.0, 6.5, 9.0, 6.5, 4.0], [2.0, 3.0, 4.0, 3.0, 2.0]])
n = (av - 1.5) * 1.1e17; n[3, :] = np.nan
hdus = [fits.PrimaryHDU()]
for name, data, unit in [('AV', av, 'mag'), ('N(H2O(s))', n, 'cm-2'), ('N(H2O(s))_err', n * 0.1, 'cm-2')]:
    hdr = wh.copy(); hdr['BUNIT'] = unit
    hdus.append(fits.ImageHDU(data, header=hdr, name=name))
fits.HDUList(hdus).writeto(d + '/astropy-map.fits', overwrite=True)
out['astropy_map'] = {'av': [clean(v) for v in av.ravel()], 'n': [clean(v) for v in n.ravel()],
                      'wcs': {k: clean(wh[k]) for k in wh.keys() if k not in ('COMMENT', 'HISTORY', '')}}
print(json.dumps(out))
`;

interface PyOut {
  ours_images: { name: string; bitpix: number; shape: number[]; raw: (number | null)[]; bscale: number; bzero: number; blank: number | null }[];
  ours_header: Record<string, string | number>;
  ours_table: { name: string; columns: Record<string, { format: string; unit: string | null; values: (number | string | boolean | null)[] }> };
  astropy_images: { name: string; bitpix: number; bzero: number; values: (number | null)[] }[];
  astropy_table: Record<string, (number | string)[]>;
  astropy_map: { av: number[]; n: (number | null)[]; wcs: Record<string, string | number> };
}

const nanToNull = (xs: ArrayLike<number>) => Array.from(xs, (v) => (Number.isNaN(v) ? null : v));

describeWithReference(ASTROPY, 'FITS against astropy.io.fits', () => {
  const dir = scratch('hoarfrost-astropy-');
  let py: PyOut;
  const f64 = Float64Array.from({ length: 12 }, (_, i) => (i === 5 ? NaN : (i + 1) * 1.2345678901234567e17));
  const f32 = Float32Array.from({ length: 12 }, (_, i) => i / 7);
  const i16 = Int16Array.from({ length: 12 }, (_, i) => i * 1000 - 6000);
  const i32 = Int32Array.from({ length: 12 }, (_, i) => i * 100000000 - 600000000);
  const u8 = Uint8Array.from({ length: 12 }, (_, i) => i * 20);
  beforeAll(() => {
    writeFitsImages(`${dir}/ours-images.fits`, [
      { name: 'F64', nx: 4, ny: 3, data: f64, header: [{ key: 'CTYPE1', value: 'RA---TAN' }, { key: 'CRVAL1', value: 70.15 }, { key: 'CDELT1', value: -0.0025 }, { key: 'OBSERVER', value: "O'Frost" }, { key: 'BUNIT', value: 'cm-2' }] },
      { name: 'F32', nx: 4, ny: 3, data: f32 },
      { name: 'I16', nx: 4, ny: 3, data: i16, bscale: 0.5, bzero: 10, blank: -6000 },
      { name: 'I32', nx: 4, ny: 3, data: i32 },
      { name: 'U8', nx: 4, ny: 3, data: u8 },
    ]);
    writeFitsTable(`${dir}/ours-table.fits`, {
      name: 'ICES',
      columns: [
        { name: 'id', data: ['FM-01', 'FM-02', 'FM-03'] },
        { name: 'N(CO(s))', data: new Float64Array([1.0000000000000002e17, 3.3e17, NaN]), unit: 'cm-2' },
        { name: 'e', data: new Float32Array([0.5, 0.25, 0.125]) },
        { name: 'j', data: new Int32Array([-1, 0, 2147483647]) },
        { name: 'i', data: new Int16Array([-32768, 1, 32767]) },
        { name: 'k', data: new BigInt64Array([-1n, 0n, 1099511627776n]) },
        { name: 'ok', data: [true, false, true] },
      ],
    });
    const r = spawnSync(PYTHON, [write(dir, 'check.py', SCRIPT), dir], { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(`astropy script failed: ${r.stderr}`);
    py = JSON.parse(r.stdout) as PyOut;
  });

  it('astropy verifies our image file and reads every BITPIX to the same stored values', () => {
    expect(py.ours_images.map((h) => [h.name, h.bitpix, h.shape])).toEqual([
      ['F64', -64, [3, 4]],
      ['F32', -32, [3, 4]],
      ['I16', 16, [3, 4]],
      ['I32', 32, [3, 4]],
      ['U8', 8, [3, 4]],
    ]);
    expect(py.ours_images[0].raw).toEqual(nanToNull(f64));
    expect(py.ours_images[1].raw).toEqual(Array.from(f32));
    expect(py.ours_images[2]).toMatchObject({ raw: Array.from(i16), bscale: 0.5, bzero: 10, blank: -6000 });
    expect(py.ours_images[3].raw).toEqual(Array.from(i32));
    expect(py.ours_images[4].raw).toEqual(Array.from(u8));
    expect(py.ours_header).toEqual({ CTYPE1: 'RA---TAN', CRVAL1: 70.15, CDELT1: -0.0025, OBSERVER: "O'Frost", BUNIT: 'cm-2' });
  });

  it('astropy verifies our binary table and reads its columns, formats and units', () => {
    const c = py.ours_table.columns;
    expect(py.ours_table.name).toBe('ICES');
    expect(Object.fromEntries(Object.entries(c).map(([k, v]) => [k, v.format]))).toEqual({ id: '5A', 'N(CO(s))': 'D', e: 'E', j: 'J', i: 'I', k: 'K', ok: 'L' });
    expect(c['N(CO(s))'].unit).toBe('cm-2');
    expect(c.id.values).toEqual(['FM-01', 'FM-02', 'FM-03']);
    expect(c['N(CO(s))'].values).toEqual([1.0000000000000002e17, 3.3e17, null]);
    expect(c.e.values).toEqual([0.5, 0.25, 0.125]);
    expect(c.j.values).toEqual([-1, 0, 2147483647]);
    expect(c.i.values).toEqual([-32768, 1, 32767]);
    expect(c.k.values).toEqual([-1, 0, 1099511627776]);
    expect(c.ok.values).toEqual([true, false, true]);
  });

  it("our reader reads astropy's images to the same numbers: float64, float32, uint16 (BZERO 32768), scaled int16, BLANK int32, uint8", () => {
    const f = readFits(`${dir}/astropy-images.fits`);
    expect(f.hdus.map((h) => h.bitpix)).toEqual(py.astropy_images.map((h) => h.bitpix));
    expect(py.astropy_images[2].bzero).toBe(32768);
    f.hdus.forEach((h, i) => {
      expect(nanToNull(readFitsImage(f, h).data)).toEqual(py.astropy_images[i].values);
    });
  });

  it("our reader reads astropy's binary table; loadObservations reads it as observations", () => {
    const f = readFits(`${dir}/astropy-table.fits`);
    const cols = readFitsBinaryTable(f, f.hdus[1]);
    for (const c of cols) expect(c.values.map((v) => (typeof v === 'number' && Number.isNaN(v) ? null : v))).toEqual(py.astropy_table[c.name]);
    expect(cols.find((c) => c.name === 'AV')!.unit).toBe('mag');
    const set = loadObservations(section({ file: `${dir}/astropy-table.fits`, hdu: 'ices' }), dir);
    expect(set.sightlines.map((s) => s.id)).toEqual(['cA-1', 'cA-2', 'cA-3']);
    expect(set.sightlines.map((s) => s.columns['H2O(s)'].value)).toEqual(py.astropy_table['N(H2O(s))']);
    expect(set.sightlines.map((s) => s.avErr)).toEqual(py.astropy_table.AV_err);
  });

  it("an astropy map set with an astropy.wcs header: values, NaN pixels and every WCS card kept", () => {
    const set = loadObservations(section({ file: `${dir}/astropy-map.fits` }), dir);
    expect(set.kind).toBe('map');
    expect(set.map!.nx).toBe(5);
    expect(set.map!.ny).toBe(4);
    const observed = py.astropy_map.n.flatMap((v, i) => (v === null ? [] : [i]));
    expect(set.sightlines.map((s) => s.id)).toEqual(observed.map((i) => `${i % 5},${Math.floor(i / 5)}`));
    set.sightlines.forEach((s, k) => {
      expect(s.av).toBe(py.astropy_map.av[observed[k]]);
      expect(s.columns['H2O(s)'].value).toBe(py.astropy_map.n[observed[k]]);
    });
    for (const [k, v] of Object.entries(py.astropy_map.wcs)) {
      if (/^(WCSAXES|CRPIX|CRVAL|CDELT|CTYPE|CUNIT|LONPOLE|LATPOLE|RADESYS|EQUINOX|MJD-OBS|DATE-OBS)/.test(k)) expect(set.map!.wcs[k]).toEqual(v);
    }
    expect(set.map!.wcs.CTYPE1).toBe('RA---TAN');
  });
});
