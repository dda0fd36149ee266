/** The in-memory network: what the loaders produce and the compiler consumes. */
import type { RateLawName } from './laws.ts';
import type { Species } from './species.ts';

export interface SourceLocation {
  file: string;
  /** 1-based line (YAML) or data row (tables). */
  line?: number;
  row?: number;
}

/** How a reaction the model made from the network's own reactions came about (src/chem/nondiffusive.ts, src/chem/ice-photolysis.ts). */
export interface DerivedFrom {
  mechanism: 'three-body' | 'eley-rideal' | 'photodissociation-induced' | 'ice-photolysis' | 'encounter-desorption';
  /** The reactions it was made from: the one that makes the fresh species first, the follow-on reaction last. */
  parents: Reaction[];
  /**
   * Non-diffusive reactions: the species just formed (or just landed) that
   * reacts at once, its partner and the follow-on products. The rate goes as
   * the listed reactants, but what is used up is fresh + partner (the fresh
   * species' own formation is already counted by its parent).
   */
  fresh?: string;
  partner?: string;
  produces?: string[];
  /** How many of the fresh species one parent event makes (2 for Y -> F + F). */
  multiplicity?: number;
  /** Readable name for outputs, checks and --emit-system. */
  label: string;
}

export interface Reaction {
  /** 0-based index in the network's reaction list. */
  index: number;
  reactants: string[];
  products: string[];
  law: RateLawName;
  /** Every parameter of the law, defaults filled in. */
  params: Readonly<Record<string, number>>;
  /** Valid temperature range, K; outside it T is clamped to the nearest edge. */
  tmin: number;
  tmax: number;
  origin: string;
  /**
   * Uncertainty factor F of the coefficient as the network gives it
   * (log-normal, one standard deviation: docs/physics.md section 13);
   * undefined leaves the law's default (src/chem/uncertainty.ts).
   */
  uncertaintyFactor?: number;
  source: SourceLocation;
  /** Set on reactions the model derived rather than read from the file. */
  derived?: DerivedFrom;
}

export interface SpeciesData {
  name: string;
  /** Desorption (binding) energy E_D on the grain surface, K (ice species or their gas form). */
  bindingEnergy?: number;
  /** Mass in u where it is not derived from the formula. */
  mass?: number;
  /** Why no surface reaction destroys the ice form on purpose (silences the no-surface-sink warning). */
  noSurfaceSink?: string;
  origin?: string;
  source?: SourceLocation;
}

export interface Network {
  name: string;
  file: string;
  /** Free text from the network file, if it gives one. */
  description?: string;
  /** Every species appearing in a reaction or the species list, in first-appearance order. */
  species: Species[];
  speciesIndex: ReadonlyMap<string, number>;
  /** Keyed by the gas name: binding energy applies to `X` and `X(s)` alike. */
  speciesData: ReadonlyMap<string, SpeciesData>;
  reactions: Reaction[];
  /** sha256 of the file contents (and mapping file, for tables). */
  contentHash: string;
}
