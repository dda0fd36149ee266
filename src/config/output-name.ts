/**
 * Names of output files that come from a user's text (figure names in the
 * pipeline file): plain file names only, so that every file stays inside
 * the output folder. Checked when the pipeline file is read, so a run stops
 * before its grid rather than at its report; src/report/paths.ts applies the
 * same rule to every name it writes.
 */

/** A file name we accept for an output: letters, digits, `.`, `-`, `_`, not starting with a dot. */
const SAFE_NAME = /^[A-Za-z0-9_-][A-Za-z0-9._-]*$/;
const MAX_NAME_LENGTH = 120;

/** Why a user-given output name (a figure or table name, without folders) is refused, or undefined when it is fine. */
export function outputNameProblem(name: string): string | undefined {
  if (name.length > 0 && name.length <= MAX_NAME_LENGTH && SAFE_NAME.test(name) && !name.includes('..')) return undefined;
  return (
    `the output name '${printableName(name)}' is not allowed: names of report outputs are plain file names ` +
    `(1 to ${MAX_NAME_LENGTH} letters, digits, '.', '-' or '_', not starting with '.', no '..', no '/' or '\\'), ` +
    `so that every file stays inside the output folder. Choose a name such as 'fig2_chi2_map'.`
  );
}

/** Show a name in an error message without control characters. */
export function printableName(name: string): string {
  return name.replace(/[\u0000-\u001f\u007f]/g, '?');
}
