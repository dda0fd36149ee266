/** The one decision on outside references: run when present, fail when CI requires them, skip with a notice elsewhere. */
import { existsSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { decideReference, PYTHON, pythonModuleProbe, type OutsideReference } from './references.ts';

function fake(missing: string | null): OutsideReference {
  return { name: 'Fakelib', requireVariable: 'HOARFROST_REQUIRE_FAKELIB', install: 'the fakelib package', probe: () => missing };
}

describe('decideReference', () => {
  it('runs when the probe finds the reference, whether or not CI requires it', () => {
    const ref = fake(null);
    expect(decideReference(ref, ref.probe(), {})).toEqual({ kind: 'run' });
    expect(decideReference(ref, ref.probe(), { HOARFROST_REQUIRE_FAKELIB: '1' })).toEqual({ kind: 'run' });
  });

  it('skips a missing reference with a notice naming it, why, what to install and the CI variable', () => {
    const ref = fake('no module named fakelib');
    for (const env of [{}, { HOARFROST_REQUIRE_FAKELIB: '0' }, { HOARFROST_REQUIRE_OTHER: '1' }]) {
      const d = decideReference(ref, ref.probe(), env);
      expect(d.kind).toBe('skip');
      if (d.kind === 'skip') {
        expect(d.notice).toContain('Fakelib tests skipped');
        expect(d.notice).toContain('no module named fakelib');
        expect(d.notice).toContain('the fakelib package');
        expect(d.notice).toContain('HOARFROST_REQUIRE_FAKELIB=1');
      }
    }
  });

  it('fails a missing reference when HOARFROST_REQUIRE_<NAME>=1', () => {
    const ref = fake('no module named fakelib');
    const d = decideReference(ref, ref.probe(), { HOARFROST_REQUIRE_FAKELIB: '1' });
    expect(d.kind).toBe('fail');
    if (d.kind === 'fail') expect(d.message).toMatch(/Fakelib is unavailable \(no module named fakelib\).*HOARFROST_REQUIRE_FAKELIB=1/);
  });
});

describe('pythonModuleProbe', () => {
  it('reports a module the Python lacks (the case of a machine without astropy), which then skips', () => {
    const missing = pythonModuleProbe('hoarfrost_no_such_module')();
    expect(missing).not.toBeNull();
    expect(missing).toContain('hoarfrost_no_such_module');
    expect(decideReference(fake(missing), missing, {}).kind).toBe('skip');
  });

  it('reports a Python that is not there', () => {
    expect(pythonModuleProbe('json', '/nonexistent/python3')()).toMatch(/\/nonexistent\/python3 cannot import json: .*ENOENT/);
  });

  it.runIf(existsSync(PYTHON))("finds a module of Python's standard library", () => {
    expect(pythonModuleProbe('json')()).toBeNull();
  });
});
