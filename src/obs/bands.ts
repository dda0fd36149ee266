/**
 * Band strengths for ice columns from integrated optical depth,
 * N = integral(tau d nu) / A (docs/physics.md section 5). The table lives in
 * config/band-strengths.yaml; its values are recalled ("memory").
 */
import { fileURLToPath } from 'node:url';
import { z } from 'zod';
import { loadYamlFile, validate } from '../config/yaml.ts';

export const DEFAULT_BAND_TABLE = fileURLToPath(new URL('../../config/band-strengths.yaml', import.meta.url));

const bandTable = z
  .object({
    bands: z
      .array(
        z
          .object({
            name: z.string(),
            species: z.string(),
            wavelength_um: z.number().positive(),
            /** cm per molecule. */
            strength_cm: z.number().positive(),
            origin: z.string(),
          })
          .strict(),
      )
      .min(1),
  })
  .strict();

export interface Band {
  name: string;
  species: string;
  wavelengthUm: number;
  strengthCm: number;
  origin: string;
}

export interface BandTable {
  file: string;
  bands: Band[];
  /** The named band, or the species' default band (the first listed for it). */
  find(species: string, name?: string): Band | undefined;
}

export function loadBandTable(file: string = DEFAULT_BAND_TABLE): BandTable {
  const loaded = loadYamlFile(file, 'band-strength table');
  const data = validate(bandTable, loaded);
  const bands = data.bands.map((b) => ({ name: b.name, species: b.species, wavelengthUm: b.wavelength_um, strengthCm: b.strength_cm, origin: b.origin }));
  return {
    file,
    bands,
    find: (species, name) => (name !== undefined ? bands.find((b) => b.name === name && b.species === species) : bands.find((b) => b.species === species)),
  };
}
