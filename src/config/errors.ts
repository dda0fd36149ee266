/**
 * Errors a user can meet. Every one names where (file, line or row, field),
 * what was expected, what was found, and how to fix it. The CLI prints the
 * message and exits non-zero; it never shows a stack trace for these.
 */
export interface ErrorLocation {
  file?: string;
  line?: number;
  row?: number;
  field?: string;
}

export class UserError extends Error {
  readonly location: ErrorLocation;
  readonly exitCode: number;

  constructor(message: string, location: ErrorLocation = {}, exitCode = 2) {
    super(formatMessage(message, location));
    this.name = 'UserError';
    this.location = location;
    this.exitCode = exitCode;
  }
}

/** Several problems found in one pass (a file with many bad rows): all are reported, none dropped. */
export class UserErrors extends UserError {
  readonly problems: UserError[];

  constructor(summary: string, problems: UserError[], location: ErrorLocation = {}) {
    super(`${summary}\n${problems.map((p) => `  - ${p.message}`).join('\n')}`, location);
    this.name = 'UserErrors';
    this.problems = problems;
  }
}

/** Problems listed one by one in a collected error before the rest are counted. */
export const MAX_LISTED_PROBLEMS = 40;

/**
 * The problems one pass found (at least one) as one error: a single problem
 * as itself, several as one UserErrors headed by `summary` (a long list cut
 * after MAX_LISTED_PROBLEMS, with a count of the rest), so that a user sees
 * every problem of a file at once.
 */
export function collectedError(problems: readonly UserError[], summary: string, location: ErrorLocation = {}): UserError {
  if (problems.length === 1) return problems[0];
  const listed = problems.slice(0, MAX_LISTED_PROBLEMS);
  if (problems.length > MAX_LISTED_PROBLEMS) listed.push(new UserError(`... and ${problems.length - MAX_LISTED_PROBLEMS} more problems`));
  return new UserErrors(summary, listed, location);
}

/** Throw the problems one pass found, if any (see collectedError). */
export function throwProblems(problems: readonly UserError[], summary: string, location: ErrorLocation = {}): void {
  if (problems.length > 0) throw collectedError(problems, summary, location);
}

function formatMessage(message: string, loc: ErrorLocation): string {
  const where: string[] = [];
  if (loc.file) {
    let w = loc.file;
    if (loc.line !== undefined) w += `:${loc.line}`;
    where.push(w);
  }
  if (loc.row !== undefined) where.push(`row ${loc.row}`);
  if (loc.field) where.push(`field '${loc.field}'`);
  return where.length > 0 ? `${where.join(', ')}: ${message}` : message;
}

export function isUserError(e: unknown): e is UserError {
  return e instanceof UserError;
}
