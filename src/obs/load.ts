/**
 * Loading an observation set: choose the reader from the file extension (or
 * the section's `format`), find the column mapping (the section's `columns`,
 * a `columns_file`, or a `<name>.columns.yaml` beside the data), read, check.
 */
import { existsSync, statSync } from 'node:fs';
import { basename, dirname, extname, isAbsolute, join, relative, resolve } from 'node:path';
import { UserError } from '../config/errors.ts';
import { MAX_CELL_CHARACTERS, maxObservationBytes, maxObservationRows } from '../config/limits.ts';
import { loadYamlFile, readTextFile, validate } from '../config/yaml.ts';
import { columnMapping, type ColumnMapping, type ObservationFormat, type ObservationsSection } from '../config/sections/observations.ts';
import { loadBandTable, type BandTable } from './bands.ts';
import { readDelimited } from './csv.ts';
import { readVotable } from './votable.ts';
import { readYamlList } from './yaml-list.ts';
import { readFitsObservations } from './fits-obs.ts';
import { tableToObservations, type RawTable } from './table.ts';
import type { ObservationSet } from './types.ts';

const EXTENSIONS: Record<string, ObservationFormat> = {
  '.csv': 'csv',
  '.tsv': 'tsv',
  '.tab': 'tsv',
  '.yaml': 'yaml',
  '.yml': 'yaml',
  '.xml': 'votable',
  '.vot': 'votable',
  '.votable': 'votable',
  '.fits': 'fits',
  '.fit': 'fits',
  '.fts': 'fits',
};

/** Reader for a file name: `.csv`, `.tsv`/`.tab`, `.yaml`/`.yml`, `.xml`/`.vot`, `.fits`/`.fit`/`.fts` (also gzip-compressed, `.fits.gz`). */
export function formatOf(file: string): ObservationFormat | undefined {
  const lower = file.toLowerCase().replace(/\.gz$/, '');
  const ext = lower.endsWith('.vot.xml') ? '.vot' : extname(lower);
  if (lower !== file.toLowerCase() && EXTENSIONS[ext] !== 'fits') return undefined;
  return EXTENSIONS[ext];
}

/** `<data file without extension>.columns.yaml`, the sidecar mapping looked for beside a table. */
export function sidecarPath(dataFile: string): string {
  const ext = /\.fits?\.gz$|\.fts\.gz$/i.exec(dataFile)?.[0] ?? extname(dataFile);
  return join(dirname(dataFile), `${basename(dataFile, ext)}.columns.yaml`);
}

function readMapping(section: ObservationsSection, baseDir: string, dataFile: string): { mapping?: ColumnMapping; source?: string } {
  if (section.columns && section.columns_file) throw new UserError("give the column mapping either inline ('columns') or as a file ('columns_file'), not both.", { field: 'observations.columns_file' });
  if (section.columns) return { mapping: section.columns, source: "the pipeline's 'observations.columns'" };
  const file = section.columns_file ? resolve(baseDir, section.columns_file) : sidecarPath(dataFile);
  if (!section.columns_file && !existsSync(file)) return {};
  const loaded = loadYamlFile(file, 'column mapping');
  return { mapping: validate(columnMapping, loaded), source: file };
}

/** A path as messages show it: relative to the working folder when inside it. */
function displayPath(abs: string): string {
  const rel = relative(process.cwd(), abs);
  return rel !== '' && !rel.startsWith('..') && !isAbsolute(rel) ? rel : abs;
}

/** A text file past the size limit is refused before it is read (src/config/limits.ts). */
function checkTextSize(file: string): void {
  let size: number;
  try {
    size = statSync(file).size;
  } catch {
    return; // the reader says why it cannot read the file
  }
  const max = maxObservationBytes();
  if (size > max) throw new UserError(`the file has ${size} bytes, more than the ${max} allowed for an observation text file (HOARFROST_MAX_OBSERVATION_BYTES raises the limit). Split the file, or save it as FITS.`, { file });
}

/** Rows and cell lengths checked before the table becomes sightlines (src/config/limits.ts). */
function checkTableSize(table: RawTable): void {
  const max = maxObservationRows();
  if (table.nrows > max) throw new UserError(`the table has ${table.nrows} rows, more than the ${max} allowed (HOARFROST_MAX_OBSERVATION_ROWS raises the limit).`, { file: table.file });
  for (const col of table.columns) {
    for (let i = 0; i < table.nrows; i++) {
      const v = col.values[i];
      if (typeof v === 'string' && v.length > MAX_CELL_CHARACTERS) {
        throw new UserError(`a cell of ${v.length} characters; cells hold at most ${MAX_CELL_CHARACTERS} (a sightline name is a short label). Check the quoting of this row.`, { ...table.place(i).loc, field: col.name });
      }
    }
  }
}

export function loadObservations(section: ObservationsSection, baseDir: string, knownSpecies?: ReadonlySet<string>): ObservationSet {
  const file = displayPath(resolve(baseDir, section.file));
  const format = section.format ?? formatOf(file);
  if (!format) {
    throw new UserError(`cannot tell the format from the extension '${extname(file) || '(none)'}'. Name the file .csv, .tsv, .yaml, .xml/.vot (VOTable) or .fits, or set 'format' in the observations section.`, { file, field: 'format' });
  }
  let bands: BandTable | undefined;
  const opts = {
    knownSpecies,
    akPerAv: section.ak_per_av,
    maxErrorRatio: section.max_error_ratio,
    bands: () => (bands ??= loadBandTable(section.band_strengths ? resolve(baseDir, section.band_strengths) : undefined)),
  };
  let table: RawTable;
  let mapping: ColumnMapping | undefined;
  let mappingSource: string | undefined;
  if (format !== 'fits') checkTextSize(file);
  if (format === 'yaml') {
    const r = readYamlList(file, readTextFile(file, 'observation file'));
    table = r.table;
    mapping = r.mapping;
    mappingSource = file;
    const m = readMapping(section, baseDir, file);
    if (m.mapping) throw new UserError(`a YAML list of sightlines names its own species; remove the column mapping (${m.source}).`, { file });
  } else {
    const m = readMapping(section, baseDir, file);
    mapping = m.mapping;
    mappingSource = m.source;
    if (format === 'csv' || format === 'tsv') table = readDelimited(file, readTextFile(file, 'observation table'), format);
    else if (format === 'votable') table = readVotable(file, readTextFile(file, 'VOTable'));
    else table = readFitsObservations(file, section.hdu);
  }
  if (section.hdu !== undefined && format !== 'fits') throw new UserError("'hdu' applies to FITS files only.", { file, field: 'hdu' });
  checkTableSize(table);
  return tableToObservations(table, { ...opts, mapping, mappingSource });
}
