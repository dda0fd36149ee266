/** Defaults written once: a pipeline section left out reads as the same section written empty, so its fields' defaults are the only ones. */
import { describe, expect, it } from 'vitest';
import { pipelineSchema } from '../../src/config/pipeline.ts';

describe('pipeline section defaults', () => {
  it('a missing grain, photochemistry, times or solver section equals an empty one', () => {
    const bare = pipelineSchema.parse({ network: 'n.yaml' });
    const empty = pipelineSchema.parse({ network: 'n.yaml', grain: {}, photochemistry: {}, times: {}, solver: {} });
    expect(bare).toEqual(empty);
    // The values are the fields' own defaults (src/config/pipeline.ts), spelled out here once as a check.
    expect(bare.times).toEqual({ start_yr: 1e3, end_yr: 1e7, count: 41 });
    expect(bare.solver).toEqual({ rtol: 1e-6, atol: 1e-25, max_steps: 50000 });
    expect(bare.grain).toEqual({
      tunnelling: false,
      diffusion_competition: false,
      h2_formation: 'surface',
      three_body: false,
      eley_rideal: false,
      photodissociation_induced: false,
      ice_photolysis: false,
      ice_photolysis_factor: 1,
      mantle: false,
      surface_layers: 1,
    });
    expect(bare.photochemistry).toEqual({ h2_self_shielding: true });
  });

  it('a section given in part keeps the defaults of the rest', () => {
    expect(pipelineSchema.parse({ network: 'n.yaml', solver: { rtol: 1e-8 } }).solver).toEqual({ rtol: 1e-8, atol: 1e-25, max_steps: 50000 });
  });
});
