/** `observations:` section of a pipeline file. Owned by the observations room (src/obs). */
import { z } from 'zod';

/**
 * Where one species' column density sits in a table (column names) or a FITS
 * map set (EXTNAME of the images). Give `value` (a column density) or
 * `tau_int` (an integrated optical depth, turned into a column through a band
 * strength), and one of `error` (symmetric) or `error_lo` + `error_hi`.
 */
export const speciesColumns = z
  .object({
    value: z.string().optional(),
    error: z.string().optional(),
    error_lo: z.string().optional(),
    error_hi: z.string().optional(),
    /** Column holding `<` (upper limit), `>` (lower limit) or blank (detection); `upper`/`lower`/`U`/`L` are read too. Images: 0, 1 (upper), 2 (lower). */
    limit: z.string().optional(),
    /** Column holding each limit's confidence level as a fraction (0.997) or in sigma (3). */
    confidence: z.string().optional(),
    /** Confidence level of every limit of this species, when no column gives it. */
    limit_confidence: z.number().gt(0).lt(1).optional(),
    /** Unit of the value and error columns of a CSV/TSV/YAML file (e.g. `cm-2`, `1e17 cm-2`, `cm-1` for tau_int). VOTable and FITS give their own. */
    unit: z.string().optional(),
    /** Integrated optical depth column (cm^-1, integral of tau over wavenumber) and its error. */
    tau_int: z.string().optional(),
    tau_int_error: z.string().optional(),
    /** Band in config/band-strengths.yaml (e.g. `H2O-3.0um`); default: the table's default band of the species. */
    band: z.string().optional(),
  })
  .strict();
export type SpeciesColumns = z.infer<typeof speciesColumns>;

/** Column mapping of a table (or EXTNAMEs of a map set). Absent keys follow the naming convention in src/obs/mapping.ts. */
export const columnMapping = z
  .object({
    id: z.string().optional(),
    av: z.string().optional(),
    av_error: z.string().optional(),
    /** K-band extinction, converted to A_V with `ak_per_av` when no A_V column is mapped. */
    ak: z.string().optional(),
    ak_error: z.string().optional(),
    ra: z.string().optional(),
    dec: z.string().optional(),
    /** Unit of the A_V/A_K columns in a CSV/TSV file (default mag). */
    extinction_unit: z.string().optional(),
    species: z.record(z.string(), speciesColumns).optional(),
  })
  .strict();
export type ColumnMapping = z.infer<typeof columnMapping>;

export const observationFormats = ['csv', 'tsv', 'yaml', 'votable', 'fits'] as const;
export type ObservationFormat = (typeof observationFormats)[number];

/** Model-cloud A_V as a fraction of the observed line-of-sight A_V, also when the pipeline has no observations section (0.5 toward background stars: common practice). */
export const DEFAULT_MODEL_AV_FRACTION = 0.5;

export const observationsSection = z
  .object({
    /** Path to the table, YAML list, VOTable or FITS file (relative to the pipeline file). */
    file: z.string(),
    /** Reader; chosen from the file extension when absent. */
    format: z.enum(observationFormats).optional(),
    /** Column mapping (tables) or EXTNAME mapping (FITS maps). */
    columns: columnMapping.optional(),
    /** A YAML file holding the column mapping instead (default: `<data file without extension>.columns.yaml` when it exists). */
    columns_file: z.string().optional(),
    /** FITS: HDU to read a binary table from (EXTNAME or 0-based index); default the first binary table, else the images as a map. */
    hdu: z.union([z.string(), z.number().int().min(0)]).optional(),
    /** N_H/A_V, cm^-2 mag^-1 (Bohlin, Savage & Drake 1978; 2.21e21 from Guver & Ozel 2009 is the other common choice). */
    nh_per_av: z.number().positive().default(1.87e21),
    /** A_K/A_V (Rieke & Lebofsky 1985). */
    ak_per_av: z.number().positive().lt(1).default(0.112),
    /** Extinction subtracted from A_V for ice species (0 to turn off; about 3 mag for water ice: Whittet and co-workers, memory). */
    ice_threshold_av: z.number().min(0).default(0),
    /** Model-cloud A_V as a fraction of the observed line-of-sight A_V (0.5 toward background stars: common practice). */
    model_av_fraction: z.number().positive().max(1).default(DEFAULT_MODEL_AV_FRACTION),
    /** Reference species for ratios. */
    reference: z.string().default('H2O(s)'),
    /** Band-strength table, relative to the pipeline file; default the tool's config/band-strengths.yaml. */
    band_strengths: z.string().optional(),
    /**
     * An error larger than this multiple of its value is flagged with a warning (a unit or
     * exponent slip is the usual cause; a measurement this weak is used as a limit anyway).
     */
    max_error_ratio: z.number().positive().default(3),
    /**
     * Detections below this signal-to-noise ratio (value over its lower error) are used as
     * upper limits at value + min_snr x error, with a note per sightline: in log10 their
     * error has no lower side (docs/physics.md section 5; common practice: about 2).
     */
    min_snr: z.number().min(0).default(2),
  })
  .strict();
export type ObservationsSection = z.infer<typeof observationsSection>;
/** What the section looks like before defaults are applied (what a caller may write). */
export type ObservationsSectionInput = z.input<typeof observationsSection>;
