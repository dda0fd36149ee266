/** The observations room: read observation files, derive abundances and ratios. */
export * from './types.ts';
export { loadObservations, formatOf, sidecarPath } from './load.ts';
export { deriveQuantities, modelAv, hydrogenColumn, effectiveAv, ratioKind, type WantedQuantity } from './derive.ts';
export { loadBandTable, DEFAULT_BAND_TABLE, type Band, type BandTable } from './bands.ts';
export { parseUnit } from './units.ts';
