/** Small networks built by hand for the model and chemistry tests. */
import { RATE_LAWS, type RateLawName } from '../../src/chem/laws.ts';
import type { Network, Reaction, SpeciesData } from '../../src/chem/network-types.ts';
import { parseSpecies, type Species } from '../../src/chem/species.ts';

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
