import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadPipeline } from '../../src/config/pipeline.ts';
import { modelCautions } from '../../src/pipeline/model-cautions.ts';
import { ROOT } from '../support/cli.ts';

describe('the cautions of a pipeline model', () => {
  it('name layered columns, a first stage and a collapse where the pipeline has them, and nothing for the plain demo', () => {
    expect(modelCautions(loadPipeline(join(ROOT, 'pipelines/demo.yaml')))).toEqual([]);
    const layered = modelCautions(loadPipeline(join(ROOT, 'pipelines/examples/demo-layered.yaml')));
    expect(layered).toHaveLength(1);
    expect(layered[0]).toMatch(/^Columns are sums over the layers of a slab lit on both faces \(cells of 1 mag/);
    const collapse = modelCautions(loadPipeline(join(ROOT, 'pipelines/examples/collapse.yaml')));
    expect(collapse).toHaveLength(2);
    expect(collapse[0]).toMatch(/^Ages count from the end of a first stage of 1000000 yr \(density 1000, visual_extinction 1.5/);
    expect(collapse[1]).toMatch(/^Densities follow a free-fall collapse \(retardation 0.5\) from each model's density to 100000 cm\^-3, with A_V growing/);
  });
});
