/**
 * The --emit-system contract against an independent stiff solver: the
 * default network's emitted mass-action system, integrated by SciPy's BDF
 * (scipy.integrate.solve_ivp, Debian python3-scipy at /usr/bin/python3, a
 * general-purpose reference library), reproduces runModel with
 * massActionOnly. The right-hand side and Jacobian are built in Python from
 * the JSON alone. Skipped where SciPy is not installed, except when
 * HOARFROST_REQUIRE_SCIPY=1 (CI): then a missing SciPy fails.
 */
import { execFileSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { expect, it } from 'vitest';
import { DEFAULT_GRAIN_OPTIONS, defaultConditions } from '../../src/config/conditions.ts';
import { loadNetwork } from '../../src/chem/network.ts';
import { compile } from '../../src/chem/system.ts';
import { YEAR_SECONDS } from '../../src/chem/constants.ts';
import { initialState, loadInitialComposition, outputTimesYr, runModel } from '../../src/model/run.ts';
import { describeWithReference, PYTHON, SCIPY } from '../support/references.ts';
import { scratch } from '../support/scratch.ts';

const SOLVE = String.raw`
import json, sys
import numpy as np
from scipy.integrate import solve_ivp
from scipy.sparse import coo_matrix, csr_matrix
S = json.load(open(sys.argv[1]))
n = len(S['species']); terms = S['terms']; m = len(terms)
assert all(1 <= len(t['reactants']) <= 2 for t in terms)
K = np.array([t['k'] for t in terms])
two = np.array([len(t['reactants']) == 2 for t in terms])
r1 = np.array([t['reactants'][0] for t in terms])
r2 = np.array([t['reactants'][-1] for t in terms])
rows, cols, vals = [], [], []
for j, t in enumerate(terms):
    for i in t['reactants']: rows.append(i); cols.append(j); vals.append(-1.0)
    for i in t['products']: rows.append(i); cols.append(j); vals.append(1.0)
N = csr_matrix(coo_matrix((vals, (rows, cols)), shape=(n, m)))
second = lambda y: np.where(two, y[r2], 1.0)
f = lambda t, y: N @ (K * y[r1] * second(y))
jr = np.concatenate([np.arange(m), np.arange(m)[two]])
jc = np.concatenate([r1, r2[two]])
def jac(t, y):
    d = np.concatenate([K * second(y), (K * y[r1])[two]])
    return N @ csr_matrix((d, (jr, jc)), shape=(m, n))
sol = solve_ivp(f, (0.0, S['times_s'][-1]), np.array(S['y0']), method='BDF', t_eval=S['times_s'], rtol=1e-8, atol=1e-22, jac=jac)
print(json.dumps({'status': int(sol.status), 'message': sol.message, 'y': sol.y.T.tolist()}))
`;

describeWithReference(SCIPY, 'emitted default network vs SciPy BDF', () => {
  it('agrees with runModel(massActionOnly) at every output time', () => {
    const network = loadNetwork(join(import.meta.dirname, '..', '..', 'config', 'networks', 'dark-cloud.yaml'));
    const conditions = defaultConditions();
    const initial = loadInitialComposition('low-metal', '.', network);
    const timesYr = outputTimesYr(1e3, 1e7, 9);
    const input = { network, conditions, grain: DEFAULT_GRAIN_OPTIONS, initial, timesYr, solver: { rtol: 1e-8, atol: 1e-22, maxSteps: 50000 }, massActionOnly: true };
    const system = compile(network, conditions, DEFAULT_GRAIN_OPTIONS, { massActionOnly: true });
    const dir = scratch('hoarfrost-emit-');
    const file = join(dir, 'system.json');
    writeFileSync(file, JSON.stringify(system.emitSystem(initialState(input), timesYr.map((t) => t * YEAR_SECONDS))));
    const reference = JSON.parse(execFileSync(PYTHON, ['-c', SOLVE, file], { encoding: 'utf8', maxBuffer: 64 * 2 ** 20 })) as { status: number; message: string; y: number[][] };
    expect(reference.status, reference.message).toBe(0);
    const model = runModel(input);
    expect(model.status).toBe('ok');
    const n = network.species.length;
    let worst = 0;
    let worstAt = '';
    reference.y.forEach((y, k) =>
      y.forEach((v, i) => {
        const a = model.abundances[k * n + i];
        // Species above 1e-12 of H: the ones an observer could see; below, both solvers' absolute errors dominate.
        if (Math.max(a, v) > 1e-12) {
          const d = Math.abs(a - v) / Math.max(a, v);
          if (d > worst) [worst, worstAt] = [d, `${network.species[i].name} at ${timesYr[k]} yr`];
        }
      }),
    );
    expect(worst, worstAt).toBeLessThan(1e-5);
  });
});
