/**
 * Output paths stay inside the output folder the pipeline names. Names of
 * figures and files come from the pipeline file (a user's text): a name that
 * would step out of the folder (`../../x`, `/etc/x`, `a/b`) is refused.
 */
import { isAbsolute, relative, resolve, sep } from 'node:path';
import { UserError } from '../config/errors.ts';

/** A file name we accept for an output: letters, digits, `.`, `-`, `_`, not starting with a dot. */
const SAFE_NAME = /^[A-Za-z0-9_-][A-Za-z0-9._-]*$/;
const MAX_NAME_LENGTH = 120;

/** Why a user-given output name (a figure or table name, without folders) is refused, or undefined when it is fine. */
export function outputNameProblem(name: string): string | undefined {
  if (name.length > 0 && name.length <= MAX_NAME_LENGTH && SAFE_NAME.test(name) && !name.includes('..')) return undefined;
  return (
    `the output name '${printable(name)}' is not allowed: names of report outputs are plain file names ` +
    `(1 to ${MAX_NAME_LENGTH} letters, digits, '.', '-' or '_', not starting with '.', no '..', no '/' or '\\'), ` +
    `so that every file stays inside the output folder. Choose a name such as 'fig2_chi2_map'.`
  );
}

/** Refuse an unsafe output name with a UserError at `location`. */
export function checkOutputName(name: string, field: string, file?: string): void {
  const problem = outputNameProblem(name);
  if (problem) throw new UserError(problem, { file, field });
}

/** Join a checked name onto the output folder; refuses any result outside it. */
export function outputPath(outDir: string, name: string, field = 'report'): string {
  checkOutputName(name, field);
  const root = resolve(outDir);
  const full = resolve(root, name);
  const rel = relative(root, full);
  if (rel === '' || rel.startsWith('..') || isAbsolute(rel) || rel.split(sep).includes('..')) {
    throw new UserError(`the output '${printable(name)}' would be written outside the output folder ${root}; choose a plain file name.`, { field });
  }
  return full;
}

/** Show a name in an error message without control characters. */
function printable(name: string): string {
  return name.replace(/[\u0000-\u001f\u007f]/g, '?');
}
