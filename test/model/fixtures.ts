/** Small networks built by hand for the model and chemistry tests. */
import { RATE_LAWS, type RateLawName } from '../../src/chem/laws.ts';
import type { Network, Reaction, SpeciesData } from '../../src/chem/network-types.ts';
import { parseSpecies, type Species } from '../../src/chem/species.ts';
import type { EmittedSystem } from '../../src/chem/system.ts';

export interface ReactionSpec {
  reactants: string[];
  products: string[];
  law: RateLawName;
  params?: Record<string, number>;
  tmin?: number;
  tmax?: number;
}

/** A Network from reactions and species data, law defaults filled in as the loader does. */
export function makeNetwork(reactions: ReactionSpec[], speciesData: Record<string, Omit<SpeciesData, 'name'>> = {}, extraSpecies: string[] = []): Network {
  const species: Species[] = [];
  const speciesIndex = new Map<string, number>();
  const add = (name: string) => {
    if (!speciesIndex.has(name)) {
      speciesIndex.set(name, species.length);
      species.push(parseSpecies(name));
    }
  };
  const built: Reaction[] = reactions.map((r, index) => {
    [...r.reactants, ...r.products].forEach(add);
    const params: Record<string, number> = {};
    for (const p of RATE_LAWS[r.law].params) {
      const v = r.params?.[p.name] ?? p.default;
      if (v === undefined) throw new Error(`fixture reaction ${index} needs ${p.name}`);
      params[p.name] = v;
    }
    return { index, reactants: r.reactants, products: r.products, law: r.law, params, tmin: r.tmin ?? 0, tmax: r.tmax ?? 1e5, origin: 'test fixture', source: { file: 'fixture.yaml', line: index + 1 } };
  });
  extraSpecies.forEach(add);
  const data = new Map<string, SpeciesData>(Object.entries(speciesData).map(([name, d]) => [name, { name, ...d }]));
  return { name: 'fixture', file: 'fixture.yaml', species, speciesIndex, speciesData: data, reactions: built, contentHash: 'fixture' };
}

/** A problem from the JSON only: rate = k prod x_reactants; each listed reactant used once, each product made once; dense Jacobian. */
export function problemFromJson(sys: EmittedSystem) {
  const n = sys.species.length;
  const rowPtr = Int32Array.from({ length: n + 1 }, (_, i) => i * n);
  const colIdx = Int32Array.from({ length: n * n }, (_, p) => p % n);
  return {
    n,
    pattern: { rowPtr, colIdx },
    rhs(_t: number, y: Float64Array, dydt: Float64Array) {
      dydt.fill(0);
      for (const term of sys.terms) {
        let rate = term.k;
        for (const r of term.reactants) rate *= y[r];
        for (const r of term.reactants) dydt[r] -= rate;
        for (const p of term.products) dydt[p] += rate;
      }
    },
    jacobian(_t: number, y: Float64Array, values: Float64Array) {
      values.fill(0);
      for (const term of sys.terms) {
        term.reactants.forEach((col, a) => {
          let d = term.k;
          term.reactants.forEach((r, b) => {
            if (b !== a) d *= y[r];
          });
          for (const r of term.reactants) values[r * n + col] -= d;
          for (const p of term.products) values[p * n + col] += d;
        });
      }
    },
  };
}
