/**
 * Monte Carlo realizations of one model of the default network
 * (docs/uncertainty.md section 7): wall time, realizations per minute and
 * peak resident memory of N realizations on the worker pool. Expected cost:
 * about N model times divided by the workers.
 *
 *   npm run bench:realizations                      # 100 realizations, 2 workers
 *   npm run bench:realizations -- --realizations 20 --workers 1
 *
 * The load average before the run is printed: on a shared machine other work
 * slows the figures.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadPipeline } from '../src/config/pipeline.ts';
import { buildModelSetup } from '../src/model/setup.ts';
import { setupBatchPlan } from '../src/grid/plan.ts';
import { runRealizations } from '../src/grid/realizations.ts';
import { defaultConditions } from '../src/config/conditions.ts';

const NETWORK = fileURLToPath(new URL('../config/networks/dark-cloud.yaml', import.meta.url));

function arg(name: string, fallback: number): number {
  const i = process.argv.indexOf(name);
  const n = i >= 0 ? Number(process.argv[i + 1]) : fallback;
  if (!Number.isInteger(n) || n < 1) throw new Error(`${name} must be a whole number of at least 1, found ${process.argv[i + 1]}`);
  return n;
}

const count = arg('--realizations', 100);
const workers = arg('--workers', 2);
const dir = mkdtempSync(join(tmpdir(), 'hoarfrost-bench-mc-'));
try {
  const file = join(dir, 'bench.yaml');
  // The conditions of pipelines/examples/single-model.yaml.
  writeFileSync(file, `name: bench-realizations\nnetwork: ${NETWORK}\noutput: out\nconditions: { density: 2.0e4, gas_temperature: 10, dust_temperature: 10, visual_extinction: 10 }\ntimes: { start_yr: 1.0e3, end_yr: 1.0e7, count: 41 }\n`);
  const pipeline = loadPipeline(file);
  const setup = buildModelSetup(pipeline);
  const plan = setupBatchPlan(pipeline, setup);
  const conditions = { ...defaultConditions(), density: 2e4, gas_temperature: 10, dust_temperature: 10, visual_extinction: 10 };
  console.log(`load average before: ${loadavg().map((l) => l.toFixed(2)).join(' ')}`);
  const started = performance.now();
  const r = await runRealizations(pipeline, plan, [{ id: 'bench', conditions }], { count, seed: 1 }, { workers });
  const seconds = (performance.now() - started) / 1000;
  console.log(`${r.ok} of ${count} realizations of ${setup.network.name} (${setup.network.reactions.length} reactions) on ${workers} worker(s): ${seconds.toFixed(1)} s, ${((r.ok / seconds) * 60).toFixed(0)} per minute`);
  console.log(`peak resident memory of this process (workers included): ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
