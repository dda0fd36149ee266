/** The one helper for problems collected in one pass: none, one, several, and a long list cut with a count. */
import { describe, expect, it } from 'vitest';
import { MAX_LISTED_PROBLEMS, throwProblems, UserError, UserErrors } from '../../src/config/errors.ts';
import { catchUserError } from '../support/errors.ts';

const problem = (i: number) => new UserError(`problem ${i}`, { file: 'cloud.csv', row: i });

describe('throwProblems', () => {
  it('throws nothing for no problem', () => {
    expect(() => throwProblems([], 'none:')).not.toThrow();
  });

  it('throws a single problem as itself', () => {
    const only = problem(3);
    expect(catchUserError(() => throwProblems([only], '1 problem:'))).toBe(only);
  });

  it('throws several as one UserErrors headed by the summary, each listed with its location', () => {
    const e = catchUserError(() => throwProblems([problem(2), problem(5)], '2 problems:', { file: 'cloud.csv' }));
    expect(e).toBeInstanceOf(UserErrors);
    expect(e.message).toBe('cloud.csv: 2 problems:\n  - cloud.csv, row 2: problem 2\n  - cloud.csv, row 5: problem 5');
    expect(e.exitCode).toBe(2);
  });

  it('cuts a long list after MAX_LISTED_PROBLEMS and counts the rest', () => {
    const n = MAX_LISTED_PROBLEMS + 5;
    const e = catchUserError(() => throwProblems(Array.from({ length: n }, (_, i) => problem(i + 1)), `${n} problems:`)) as UserErrors;
    expect(e.problems).toHaveLength(MAX_LISTED_PROBLEMS + 1);
    expect(e.problems[MAX_LISTED_PROBLEMS - 1].message).toContain(`problem ${MAX_LISTED_PROBLEMS}`);
    expect(e.message.trimEnd().split('\n').pop()).toBe('  - ... and 5 more problems');
  });
});
