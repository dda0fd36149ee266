/**
 * What the report stage reads and writes. The pipeline stage builds a
 * ReportInput from the fit stage's outputs (OUT/fit/*.json), the observation
 * set, the observed quantities, model tracks of the best fits (read from the
 * model store) and the run's provenance, then calls
 * `writeReport(input, outDir)` (src/report/index.ts).
 */
import type { ReportSection } from '../config/sections/report.ts';
import type { FitStageResult, MapFitJson, ProfilesJson } from '../fit/types.ts';
import type { ObservationSet, ObservedQuantity } from '../obs/types.ts';

/**
 * One model quantity against time for one sightline's fit: the abundance
 * (relative to H nuclei) or ratio named by `label`, as the fit compared it.
 */
export interface ModelTrack {
  sightline: string;
  /** Same label as the ObservedQuantity and the fit's QuantityScore (e.g. `CO(s)/H2O(s)`). */
  label: string;
  modelId: string;
  /** The best fit's model, or a runner-up drawn fainter. */
  role: 'best' | 'runner-up';
  timesYr: number[];
  /** log10 of the abundance or ratio at each time; null where the model has none (zero abundance). */
  log10: (number | null)[];
  /** The 68 % band of the rate-coefficient realizations at each time, log10 (docs/uncertainty.md); best fits only. */
  band?: {
    lo: number[];
    hi: number[];
    realizations: number;
    /** Set when the best fit lies between grid values: the band is the spread of this grid model (the nearest), centred on the track. */
    nearestModel?: string;
  };
}

/** The reactions a sightline's fit hangs on (docs/uncertainty.md): correlation of log k with chi^2 over the realizations. */
export interface SightlineSensitivity {
  sightline: string;
  method: 'pearson' | 'spearman';
  realizations: number;
  /** |coefficient| that chance alone reaches (null when too few realizations). */
  chanceCoefficient: number | null;
  ageYr: number;
  /** Strongest first: reaction number and equation, coefficient. */
  top: { reaction: string; coefficient: number }[];
}

/** How the run was made, shown in the HTML report so a figure can be reproduced. */
export interface ReportProvenance {
  toolVersion: string;
  nodeVersion: string;
  commandLine: string[];
  pipelineFile?: string;
  /** Content hashes by what they hash: `pipeline`, `network`, `store`, `observations`, ... */
  hashes: Record<string, string>;
  /** Anything else worth recording (platform, start time), shown as given. */
  extra?: Record<string, string>;
}

export interface ReportInput {
  /** Title of the report (the pipeline's name). */
  title: string;
  /** The pipeline's `report:` section, validated (defaults applied). */
  config: ReportSection;
  /** Where `config` came from, for error messages (the pipeline file). */
  configFile?: string;
  fit: FitStageResult;
  /** Profiles (OUT/fit/profiles.json); without them the chi^2 map and profile figures cannot be drawn. */
  profiles?: ProfilesJson;
  /** Map images (OUT/fit/map.json) when the observations are a map. */
  map?: MapFitJson;
  observations: ObservationSet;
  quantities: ObservedQuantity[];
  /** Tracks of the best-fit models (and any runner-ups), per sightline and quantity. */
  tracks: ModelTrack[];
  provenance: ReportProvenance;
  /** Sensitivity of each sightline's chi^2 to the rate coefficients, when realizations were run. */
  sensitivity?: SightlineSensitivity[];
  /** Model cautions to print; defaults to the fit stage's cautions, else the report's own. */
  cautions?: string[];
}

export type FigureFormat = 'svg' | 'png' | 'pdf';

export interface FigureFile {
  /** File name stem (NAME of NAME.vl.json, NAME.svg, ...). */
  name: string;
  kind: string;
  title: string;
  sightline?: string;
  /** Absolute paths: the Vega-Lite spec, the caption (title and caption as text) and each rendered format. */
  spec: string;
  caption: string;
  rendered: Partial<Record<FigureFormat, string>>;
}

/** Every file the report wrote (absolute paths). */
export interface ReportFiles {
  dir: string;
  html: string;
  figures: FigureFile[];
  tables: { csv: string; json: string; latex: string };
  /** FITS images of map results (empty for a table of sightlines). */
  maps: string[];
  /** Every file written, sorted. */
  all: string[];
  /** Figures that could not be drawn and why (no A_V, no profiles, ...). */
  warnings: string[];
}
