/**
 * Outside references of the tests (astropy, SciPy, Chromium, Slurm): one
 * decision for all of them. A reference that is present runs; a missing one
 * fails when CI requires it (HOARFROST_REQUIRE_<NAME>=1, set by .ci/run),
 * and is skipped with a printed notice elsewhere, so that `npm ci && npm test`
 * passes on a machine with none of them.
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { describe, it, type TestContext } from 'vitest';

/** Debian's Python, where .ci/run installs python3-astropy and python3-scipy (not a user's own Python). */
export const PYTHON = '/usr/bin/python3';
/** Debian's chromium, which .ci/run installs. */
export const CHROMIUM = '/usr/bin/chromium';

export interface OutsideReference {
  /** Shown in notices: `astropy`. */
  name: string;
  /** `HOARFROST_REQUIRE_ASTROPY`: set to 1, a missing reference fails the test. */
  requireVariable: string;
  /** What to install, for the notice. */
  install: string;
  /** Why the reference cannot be used here, or null when it can. */
  probe: () => string | null;
}

export type ReferenceDecision = { kind: 'run' } | { kind: 'skip'; notice: string } | { kind: 'fail'; message: string };

/** A probe that imports Python modules with PYTHON; its answer is the import's own error when one is missing. */
export function pythonModuleProbe(modules: string, python = PYTHON): () => string | null {
  return () => {
    const r = spawnSync(python, ['-c', `import ${modules}`], { encoding: 'utf8' });
    if (r.status === 0) return null;
    const detail = (r.stderr || r.error?.message || `exit ${r.status}`).trim().split('\n').pop();
    return `${python} cannot import ${modules}: ${detail}`;
  };
}

function commandsProbe(commands: readonly string[]): () => string | null {
  return () => {
    const missing = commands.filter((c) => spawnSync('sh', ['-c', `command -v ${c}`]).status !== 0);
    return missing.length === 0 ? null : `missing ${missing.join(', ')}`;
  };
}

export const ASTROPY: OutsideReference = {
  name: 'astropy',
  requireVariable: 'HOARFROST_REQUIRE_ASTROPY',
  install: "Debian's python3-astropy",
  probe: pythonModuleProbe('astropy, numpy'),
};
export const SCIPY: OutsideReference = {
  name: 'SciPy',
  requireVariable: 'HOARFROST_REQUIRE_SCIPY',
  install: "Debian's python3-scipy",
  probe: pythonModuleProbe('numpy, scipy.integrate, scipy.sparse'),
};
export const CHROMIUM_REFERENCE: OutsideReference = {
  name: 'Chromium',
  requireVariable: 'HOARFROST_REQUIRE_CHROMIUM',
  install: "Debian's chromium",
  probe: () => (existsSync(CHROMIUM) ? null : `${CHROMIUM} not found`),
};
/** The programs scripts/slurm-local.sh starts and the test calls. */
export const SLURM: OutsideReference = {
  name: 'Slurm',
  requireVariable: 'HOARFROST_REQUIRE_SLURM',
  install: 'slurm-wlm slurmctld slurmd slurm-client munge',
  probe: commandsProbe(['munged', 'mungekey', 'slurmctld', 'slurmd', 'sbatch', 'squeue']),
};

/**
 * Run, skip or fail, given why the reference is missing (null: it is not).
 * `missing` may come from the probe or from a later attempt to use the
 * reference (a Slurm that is installed but will not start).
 */
export function decideReference(ref: OutsideReference, missing: string | null, env: NodeJS.ProcessEnv = process.env): ReferenceDecision {
  if (missing === null) return { kind: 'run' };
  const why = `${ref.name} is unavailable (${missing}); install ${ref.install}`;
  if (env[ref.requireVariable] === '1') return { kind: 'fail', message: `${why}. ${ref.requireVariable}=1: this test must run.` };
  return { kind: 'skip', notice: `${ref.name} tests skipped: ${why} (CI sets ${ref.requireVariable}=1 and then fails instead).` };
}

const probed = new Map<OutsideReference, string | null>();

/** The probe's answer, asked once per test file. */
export function referenceMissing(ref: OutsideReference): string | null {
  if (!probed.has(ref)) probed.set(ref, ref.probe());
  return probed.get(ref)!;
}

/** Whether tests against the reference can run here (they must, when required). */
export function referenceAvailable(ref: OutsideReference): boolean {
  return referenceMissing(ref) === null;
}

/**
 * A describe block whose tests need the reference: it runs when the reference
 * is present; otherwise it becomes one failing test (required) or is skipped
 * with a printed notice.
 */
export function describeWithReference(ref: OutsideReference, title: string, body: () => void): void {
  const decision = decideReference(ref, referenceMissing(ref));
  if (decision.kind === 'run') {
    describe(title, body);
  } else if (decision.kind === 'fail') {
    describe(title, () => {
      it(`needs ${ref.name}`, () => {
        throw new Error(decision.message);
      });
    });
  } else {
    console.warn(decision.notice);
    describe.skip(title, body);
  }
}

/**
 * Inside a test: go on when the reference is usable, else fail (required) or
 * skip this test with a printed notice. `missing` overrides the probe when
 * the test found out itself (e.g. Slurm installed but not starting).
 */
export function needReference(ctx: TestContext, ref: OutsideReference, missing: string | null = referenceMissing(ref)): void {
  const decision = decideReference(ref, missing);
  if (decision.kind === 'fail') throw new Error(decision.message);
  if (decision.kind === 'skip') {
    console.warn(decision.notice);
    ctx.skip();
  }
}
