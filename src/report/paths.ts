/**
 * Output paths stay inside the output folder the pipeline names. Names of
 * figures and files come from the pipeline file (a user's text): a name that
 * would step out of the folder (`../../x`, `/etc/x`, `a/b`) is refused.
 */
import { isAbsolute, relative, resolve, sep } from 'node:path';
import { UserError } from '../config/errors.ts';
import { outputNameProblem, printableName as printable } from '../config/output-name.ts';

export { outputNameProblem };

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
