/**
 * Benchmark of the stiff integrator: `npm run bench:solver`.
 *
 * Each problem is integrated a few times to warm up, then BENCH_REPEATS times; the
 * median wall and CPU times are printed with the work counts of one run and
 * the memory. Targets (issue 3, one core): Robertson to 4e10 s under 5 ms,
 * a 300-species system to 1e7 yr under 50 ms.
 *
 * To add a problem, call `benchProblem(name, makeProblem)` or append to
 * `PROBLEMS`; `makeProblem` builds everything outside the timed region.
 * CPU time is printed beside wall time because the machine may be shared:
 * under load the wall time says more about the neighbours than the solver.
 */
import { pathToFileURL } from 'node:url';
import { integrate, type IntegrateOptions, type IntegrateResult, type OdeProblem } from '../src/solve/index.ts';
import { massActionNetwork, robertson } from '../test/solve/problems.ts';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions, type GrainOptions } from '../src/config/conditions.ts';
import { loadNetwork } from '../src/chem/network.ts';
import { YEAR_SECONDS as YEAR } from '../src/chem/constants.ts';
import { compile, type CompileOptions } from '../src/chem/system.ts';
import { initialState, loadInitialComposition } from '../src/model/run.ts';
import { DENSE_MAX_N, SparseNewtonMatrix } from '../src/solve/newton-matrix.ts';

const BENCH_REPEATS = 5;
/** Warm-up: this many untimed runs, or fewer if they take longer than WARMUP_MS, so the JIT has compiled the hot loops. */
const WARMUP_RUNS = 5;
const WARMUP_MS = 2000;

export interface BenchCase {
  problem: OdeProblem;
  y0: Float64Array;
  outputTimes: ArrayLike<number>;
  options: IntegrateOptions;
  /** Optional line of extra facts printed under the figures. */
  note?: string;
}

export interface BenchRow {
  name: string;
  n: number;
  jacobianEntries: number;
  status: string;
  wallMs: number;
  cpuMs: number;
  steps: number;
  jacobianEvals: number;
  factorizations: number;
  rhsEvals: number;
  heapAfterMiB: number;
  peakRssMiB: number;
}

const median = (values: number[]): number => {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)];
};

/** Times one problem and prints its line; returns the figures. */
export function benchProblem(name: string, makeProblem: () => BenchCase, repeats = BENCH_REPEATS): BenchRow {
  const bench = makeProblem();
  const run = (): IntegrateResult => integrate(bench.problem, bench.y0, bench.outputTimes, bench.options);
  let result = run();
  const warmupStart = performance.now();
  for (let w = 1; w < WARMUP_RUNS && performance.now() - warmupStart < WARMUP_MS; w++) result = run();
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < repeats; r++) {
    const cpuStart = process.cpuUsage();
    const start = performance.now();
    result = run();
    wall.push(performance.now() - start);
    const used = process.cpuUsage(cpuStart);
    cpu.push((used.user + used.system) / 1000);
  }
  const memory = process.memoryUsage();
  const row: BenchRow = {
    name,
    n: bench.problem.n,
    jacobianEntries: bench.problem.pattern.rowPtr[bench.problem.n],
    status: result.status,
    wallMs: median(wall),
    cpuMs: median(cpu),
    steps: result.stats.steps,
    jacobianEvals: result.stats.jacobianEvals,
    factorizations: result.stats.factorizations,
    rhsEvals: result.stats.rhsEvals,
    heapAfterMiB: memory.heapUsed / 2 ** 20,
    peakRssMiB: process.resourceUsage().maxRSS / 1024,
  };
  console.log(
    `${name.padEnd(34)} n=${String(row.n).padStart(4)} nnz(J)=${String(row.jacobianEntries).padStart(6)}  ` +
      `wall ${row.wallMs.toFixed(2).padStart(8)} ms  cpu ${row.cpuMs.toFixed(2).padStart(8)} ms  ` +
      `steps ${row.steps}  jac ${row.jacobianEvals}  lu ${row.factorizations}  rhs ${row.rhsEvals}  ` +
      `heap ${row.heapAfterMiB.toFixed(1)} MiB  peak rss ${row.peakRssMiB.toFixed(0)} MiB  ${row.status}`,
  );
  if (bench.note) console.log(`  ${bench.note}`);
  if (row.n > DENSE_MAX_N) console.log(`  ${luStructure(bench)}`);
  return row;
}

/** Fill of the sparse LU of I - c J at the initial state, for the record. */
function luStructure(bench: BenchCase): string {
  const { problem, y0 } = bench;
  const jacobian = new Float64Array(problem.pattern.rowPtr[problem.n]);
  problem.jacobian(0, y0, jacobian);
  const matrix = new SparseNewtonMatrix(problem.n, problem.pattern);
  matrix.factor(jacobian, 1e10);
  const { nnzL, nnzU, denseTail } = matrix.lu.stats;
  return `sparse LU: nnz(L + U) = ${nnzL + nnzU - problem.n} of ${problem.n * problem.n}, dense tail ${denseTail}`;
}

const logSpaced = (from: number, to: number, count: number): number[] =>
  Array.from({ length: count }, (_, i) => from * (to / from) ** (i / (count - 1)));

export const PROBLEMS: [string, () => BenchCase][] = [
  [
    'Robertson to 4e10 s',
    () => {
      const { problem, y0 } = robertson();
      return { problem, y0, outputTimes: logSpaced(1e-5, 4e10, 40), options: { rtol: 1e-6, atol: 1e-12 } };
    },
  ],
  [
    'random mass-action, 300 species, 1e7 yr',
    () => {
      const { problem, y0, reactions } = massActionNetwork({ species: 300, seed: 2026 });
      return {
        problem,
        y0,
        outputTimes: logSpaced(1 * YEAR, 1e7 * YEAR, 57),
        options: { rtol: 1e-6, atol: 1e-25, nonNegative: true },
        note: `${reactions} reactions, seed 2026, n_H = 1e4 cm^-3`,
      };
    },
  ],
  ['default network, dark cloud, 1e7 yr', () => darkCloud(DEFAULT_GRAIN_OPTIONS, '')],
  ['default network, three-phase ice, 1e7 yr', () => darkCloud({ ...DEFAULT_GRAIN_OPTIONS, mantle: true }, ', grain.mantle on (docs/ice-mantle.md)')],
  [
    'default network, dark cloud, 1e7 yr, ice photolysis + non-diffusive',
    () => darkCloud({ ...DEFAULT_GRAIN_OPTIONS, icePhotolysis: true, threeBody: true, eleyRideal: true, photodissociationInduced: true }, ', grain: ice_photolysis, three_body, eley_rideal, photodissociation_induced'),
  ],
  [
    'default network, dark cloud, 1e7 yr, every ice switch',
    () =>
      darkCloud(
        { ...DEFAULT_GRAIN_OPTIONS, mantle: true, icePhotolysis: true, threeBody: true, eleyRideal: true, photodissociationInduced: true },
        ', grain: mantle, ice_photolysis, three_body, eley_rideal, photodissociation_induced',
      ),
  ],
  [
    'default network, every ice switch, mass-action part',
    () =>
      darkCloud(
        { ...DEFAULT_GRAIN_OPTIONS, mantle: true, icePhotolysis: true, threeBody: true, eleyRideal: true, photodissociationInduced: true },
        ', the system of the row above with massActionOnly (what --emit-system writes), for the issue 17 ratio',
        { massActionOnly: true },
      ),
  ],
];

/** The default network in a dark cloud with the given grain options. */
function darkCloud(grain: GrainOptions, noteTail: string, compileOptions: CompileOptions = {}): BenchCase {
  const network = loadNetwork(new URL('../config/networks/dark-cloud.yaml', import.meta.url).pathname);
  const conditions = {
    ...defaultConditions(),
    density: 2e4,
    gas_temperature: 10,
    dust_temperature: 10,
    visual_extinction: 10,
  };
  const problem = compile(network, conditions, grain, compileOptions);
  const y0 = initialState({ network, grain, initial: loadInitialComposition('low-metal', '.', network) });
  return {
    problem,
    y0,
    outputTimes: logSpaced(1e3 * YEAR, 1e7 * YEAR, 13),
    options: { rtol: 1e-6, atol: 1e-25, maxSteps: 50000 },
    note: `config/networks/dark-cloud.yaml, n_H = 2e4 cm^-3, 10 K, A_V = 10, low-metal start${noteTail}`,
  };
}

export function main(): BenchRow[] {
  console.log(`stiff integrator benchmark: median of ${BENCH_REPEATS} runs after warm-up, Node ${process.version}`);
  const rows: BenchRow[] = [];
  for (const [name, make] of PROBLEMS) {
    try {
      rows.push(benchProblem(name, make));
    } catch (e) {
      console.log(`${name}: skipped, it could not be built: ${(e as Error).message}`);
    }
  }
  return rows;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) main();
