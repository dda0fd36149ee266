/**
 * Grid throughput: models per minute for a grid of the default network on 1
 * and on 2 worker threads, and the parallel efficiency (rate with 2 workers
 * over twice the rate with 1). Goal: 1,000 models of the default network in
 * under 5 minutes on a 2-core machine (200 models per minute).
 *
 *   npm run bench:grid              # 200 models
 *   npm run bench:grid -- --models 40
 *   npm run bench:grid -- --models 40 --recommended   # with the grain section of the demo and the init template
 *
 * The load average before each run is printed: on a shared machine other
 * work slows the figures, and the efficiency most of all.
 */
import { writeFileSync, mkdtempSync } from 'node:fs';
import { loadavg, availableParallelism, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadPipeline } from '../src/config/pipeline.ts';
import { loadCandidates } from '../src/grid/candidates.ts';
import { runGrid } from '../src/grid/run.ts';

/** The grain section of pipelines/demo.yaml and the init template (docs/default-network.md), for --recommended. */
const RECOMMENDED_GRAIN_YAML = 'grain: { mantle: true, surface_layers: 1, three_body: true, eley_rideal: true, photodissociation_induced: true, ice_photolysis: true }\n';

const GOAL_MODELS = 1000;
const GOAL_MINUTES = 5;
/** visual_extinction x cr_ionisation_rate values per density: the grid is (models / 20) densities of 20 points each. */
const AV_VALUES = [2, 5, 10, 20];
const CR_VALUES = [1.3e-17, 3e-17, 6.5e-17, 1.3e-16, 3e-16];
const POINTS_PER_DENSITY = AV_VALUES.length * CR_VALUES.length;
const NETWORK = fileURLToPath(new URL('../config/networks/dark-cloud.yaml', import.meta.url));

function argModels(): number {
  const i = process.argv.indexOf('--models');
  const n = i >= 0 ? Number(process.argv[i + 1]) : 200;
  if (!Number.isInteger(n) || n < POINTS_PER_DENSITY * 2 || n % POINTS_PER_DENSITY !== 0) {
    throw new Error(`--models must be a multiple of ${POINTS_PER_DENSITY} of at least ${POINTS_PER_DENSITY * 2}, found ${process.argv[i + 1]}`);
  }
  return n;
}

function pipelineFile(dir: string, models: number): string {
  const file = join(dir, 'bench.yaml');
  writeFileSync(
    file,
    `name: grid-bench
network: ${NETWORK}
conditions:
  density: { from: 1.0e3, to: 1.0e6, count: ${models / POINTS_PER_DENSITY} }
  visual_extinction: [${AV_VALUES.join(', ')}]
  cr_ionisation_rate: [${CR_VALUES.join(', ')}]
  gas_temperature: 10
  dust_temperature: { tie: gas_temperature }
# The demo's initial composition (physics.md section 4, memory), less Cl and P, which the default network lacks.
initial: { H2: 0.5, He: 0.09, C+: 7.3e-5, N: 2.14e-5, O: 1.76e-4, S+: 8.0e-8, Si+: 8.0e-9, Fe+: 3.0e-9, Na+: 2.0e-9, Mg+: 7.0e-9 }
times: { start_yr: 1.0e3, end_yr: 1.0e7, count: 41 }
${process.argv.includes('--recommended') ? RECOMMENDED_GRAIN_YAML : ''}`,
  );
  return file;
}

async function timedRun(models: number, workers: number) {
  const dir = mkdtempSync(join(tmpdir(), `hoarfrost-bench-grid-${workers}w-`));
  const pipeline = loadPipeline(pipelineFile(dir, models));
  const load = loadavg()[0];
  let lastLine = 0;
  const r = await runGrid(pipeline, {
    workers,
    onProgress: (p) => {
      if (Date.now() - lastLine > 15_000 || p.done === p.total) {
        lastLine = Date.now();
        process.stderr.write(`  ${workers} worker(s): ${p.done}/${p.total}, ${p.ratePerMinute.toFixed(1)}/min\n`);
      }
    },
  });
  if (r.computed !== models) throw new Error(`expected ${models} models computed, got ${r.computed}`);
  return { ...r, perMinute: (r.computed / r.wallMs) * 60_000, load };
}

const models = argModels();
process.stdout.write(`grid benchmark: ${models} models of ${NETWORK}, 41 output times${process.argv.includes('--recommended') ? ', recommended grain section' : ', two-phase ice (no grain section)'}; ${availableParallelism()} cores\n`);
const one = await timedRun(models, 1);
const two = await timedRun(models, 2);
const efficiency = two.perMinute / (2 * one.perMinute);
const minutesFor1000 = GOAL_MODELS / two.perMinute;
const a = loadCandidates(one.storeFile, ['CO', 'H2O(s)']);
const b = loadCandidates(two.storeFile, ['CO', 'H2O(s)']);
const identical = Buffer.from(a.abundances.buffer).equals(Buffer.from(b.abundances.buffer));
const lines = [
  `1 worker:  ${one.perMinute.toFixed(1)} models/min (${(one.wallMs / 1000).toFixed(1)} s, ${one.failed} failed, load average before ${one.load.toFixed(2)})`,
  `2 workers: ${two.perMinute.toFixed(1)} models/min (${(two.wallMs / 1000).toFixed(1)} s, ${two.failed} failed, load average before ${two.load.toFixed(2)})`,
  `parallel efficiency: ${(efficiency * 100).toFixed(0)}%`,
  `${GOAL_MODELS} models on 2 workers: ${minutesFor1000.toFixed(1)} min (goal < ${GOAL_MINUTES} min: ${minutesFor1000 < GOAL_MINUTES ? 'met' : 'NOT met'})`,
  `abundances of the two runs bit-identical: ${identical ? 'yes' : 'NO'}`,
];
process.stdout.write(lines.join('\n') + '\n');
