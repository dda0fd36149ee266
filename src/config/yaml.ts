/**
 * YAML loading with line numbers kept, and validation through zod schemas
 * whose failures become UserErrors naming file, line and field.
 */
import { readFileSync } from 'node:fs';
import { isMap, isPair, isSeq, isScalar, LineCounter, parseDocument, visit, type Node } from 'yaml';
import type { z } from 'zod';
import { collectedError, UserError } from './errors.ts';

export type PathKey = string | number;

export interface LoadedYaml {
  file: string;
  data: unknown;
  /** 1-based line of the node at a path into the document (nearest existing ancestor). */
  lineOf(path: readonly PathKey[]): number | undefined;
  text: string;
}

/** Strict UTF-8: a byte sequence that is not UTF-8 is an error, not a replacement character. */
const UTF8 = new TextDecoder('utf-8', { fatal: true });

/**
 * A text file as a string. A binary file (a NUL byte, or bytes that are not
 * UTF-8) is refused before any parser sees it, so no error message echoes
 * raw bytes and no wrong character enters a name or a number.
 */
export function readTextFile(file: string, what = 'file'): string {
  let bytes: Buffer;
  try {
    bytes = readFileSync(file);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new UserError(`${what} not found. Check the path (relative paths are read from the folder of the file that names them).`, { file });
    if (code === 'EISDIR') throw new UserError(`expected a ${what}, found a folder.`, { file });
    throw new UserError(`cannot read ${what}: ${(e as Error).message}`, { file });
  }
  return decodeText(bytes, file, what);
}

/** The bytes of a text file as a string; binary data or bytes that are not UTF-8 are a UserError. */
export function decodeText(bytes: Uint8Array, file: string, what = 'file'): string {
  const nul = bytes.indexOf(0);
  if (nul >= 0) throw new UserError(`expected a text ${what}, found binary data (a zero byte at byte ${nul + 1}). Check that this is the right file.`, { file });
  try {
    return UTF8.decode(bytes);
  } catch {
    throw new UserError(`expected a text ${what} in UTF-8, found bytes that are not UTF-8. Save the file as UTF-8 text (or check that this is the right file).`, { file });
  }
}

/**
 * Limits on what a YAML file may ask of the reader. No file of ours nests
 * deeper than about 6 levels or repeats a value through aliases more than a
 * few dozen times; the limits are far above that and far below what fills
 * the memory (an "alias bomb" of 9 aliases per level, 6 levels, asks for
 * 9^6 = 531,441 copies).
 */
const MAX_YAML_DEPTH = 100;
const MAX_ALIAS_COPIES = 1000;

function tooDeep(file: string, line: number | undefined): UserError {
  return new UserError(`values are nested more than ${MAX_YAML_DEPTH} deep; no hoarfrost file needs that. Check the file (a bracket left open, or a file that is not meant for hoarfrost).`, { file, line });
}

/** The line of the first node nested deeper than MAX_YAML_DEPTH, found without recursion. */
function firstTooDeep(root: unknown, lc: LineCounter): { line: number | undefined } | undefined {
  const stack: [unknown, number][] = [[root, 0]];
  while (stack.length > 0) {
    const [node, depth] = stack.pop()!;
    if (depth > MAX_YAML_DEPTH) return { line: rangeLine(isPair(node) ? node.key : node, lc) };
    if (isMap(node) || isSeq(node)) for (const item of node.items) stack.push([item, depth + 1]);
    else if (isPair(node)) {
      if (node.key !== null) stack.push([node.key, depth]);
      if (node.value !== null) stack.push([node.value, depth]);
    }
  }
  return undefined;
}

export function parseYamlText(text: string, file: string): LoadedYaml {
  const lineCounter = new LineCounter();
  const doc = parseDocument(text, { lineCounter, prettyErrors: true, uniqueKeys: true });
  if (doc.errors.length > 0) {
    // The parser recurses per level of nesting; a file nested past its stack is a file nested too deep.
    const overflow = doc.errors.find((err) => err.message.includes('Maximum call stack size exceeded'));
    if (overflow) throw tooDeep(file, overflow.linePos?.[0]?.line);
    const problems = doc.errors.map((err) => {
      const line = err.linePos?.[0]?.line;
      const column = err.linePos?.[0]?.col;
      // The parser's first line ends with its own " at line L, column C:"; the line is in the location already.
      const what = err.message.split('\n')[0].replace(/ at line \d+, column \d+:?$/, '').replace(/[.:]$/, '');
      return new UserError(`malformed YAML: ${what}${column !== undefined ? ` (column ${column})` : ''}.`, { file, line });
    });
    throw collectedError(problems, 'malformed YAML:', { file });
  }
  if (text.trim() === '' || doc.contents === null) {
    throw new UserError('the file is empty; expected a YAML document.', { file });
  }
  const deep = firstTooDeep(doc.contents, lineCounter);
  if (deep) throw tooDeep(file, deep.line);
  let data: unknown;
  try {
    data = doc.toJS({ maxAliasCount: MAX_ALIAS_COPIES });
  } catch (e) {
    if (!(e instanceof ReferenceError && /alias/i.test(e.message))) throw e;
    let line: number | undefined;
    visit(doc, {
      Alias(_, node) {
        line = rangeLine(node, lineCounter);
        return visit.BREAK;
      },
    });
    throw new UserError(`the aliases (*name) of this file expand to more than ${MAX_ALIAS_COPIES} copies of values (a guard against files built to fill the memory); write the repeated values out, or use fewer aliases.`, { file, line });
  }
  const lineOf = (path: readonly PathKey[]): number | undefined => {
    let node: unknown = doc.contents;
    let best: number | undefined = rangeLine(node, lineCounter);
    for (const key of path) {
      let next: unknown;
      if (isMap(node)) {
        const pair = node.items.find((p) => (isScalar(p.key) ? p.key.value : p.key) === key);
        if (!pair) break;
        const keyLine = rangeLine(pair.key, lineCounter);
        if (keyLine !== undefined) best = keyLine;
        next = pair.value;
      } else if (isSeq(node) && typeof key === 'number') {
        next = node.items[key];
      } else break;
      if (next === undefined || next === null) break;
      node = next;
      const l = rangeLine(node, lineCounter);
      if (l !== undefined && !(isMap(node) || isSeq(node))) best = l;
      else if (l !== undefined && typeof key === 'number') best = l;
    }
    return best;
  };
  return { file, data, lineOf, text };
}

function rangeLine(node: unknown, lc: LineCounter): number | undefined {
  const range = (node as Node | undefined)?.range;
  if (!range) return undefined;
  return lc.linePos(range[0]).line;
}

export function loadYamlFile(file: string, what = 'YAML file'): LoadedYaml {
  return parseYamlText(readTextFile(file, what), file);
}

/** Validate with a zod schema; every issue becomes a located, readable problem. */
export function validate<S extends z.ZodType>(schema: S, loaded: LoadedYaml, basePath: readonly PathKey[] = [], data: unknown = loaded.data): z.infer<S> {
  const result = schema.safeParse(data);
  if (result.success) return result.data as z.infer<S>;
  const problems = result.error.issues.flatMap((issue) => issueToErrors(issue, loaded, basePath));
  throw collectedError(problems, `${problems.length} problems in ${loaded.file}:`, { file: loaded.file });
}

function describeValue(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'object') return 'a mapping';
  if (typeof v === 'string') return `the text '${v.length > 40 ? v.slice(0, 40) + '...' : v}'`;
  return `${typeof v} ${String(v)}`;
}

function valueAt(data: unknown, path: readonly PathKey[]): unknown {
  let v: unknown = data;
  for (const k of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<string | number, unknown>)[k as string];
  }
  return v;
}

/**
 * A value that matched the shape of one alternative of a union (a mapping
 * with the keys of a range, a list) is reported by that alternative's own
 * problems (`count: expected an integer`); a value that fits none keeps the
 * union's message, which lists the alternatives.
 */
function issueToErrors(issue: z.core.$ZodIssue, loaded: LoadedYaml, basePath: readonly PathKey[]): UserError[] {
  if (issue.code === 'invalid_union') {
    const shaped = issue.errors.filter((branch) => branch.length > 0 && branch.every((i) => i.path.length > 0));
    if (shaped.length > 0) {
      const best = shaped.reduce((a, b) => (b.length < a.length ? b : a));
      const here = [...basePath, ...(issue.path as PathKey[])];
      return best.flatMap((i) => issueToErrors(i, loaded, here));
    }
  }
  return [issueToError(issue, loaded, basePath)];
}

function issueToError(issue: z.core.$ZodIssue, loaded: LoadedYaml, basePath: readonly PathKey[]): UserError {
  const path = [...basePath, ...(issue.path as PathKey[])];
  const field = path.map((p) => (typeof p === 'number' ? `[${p}]` : p)).join('.').replace(/\.\[/g, '[');
  const line = loaded.lineOf(path);
  const found = valueAt(loaded.data, path);
  let message: string;
  switch (issue.code) {
    case 'unrecognized_keys': {
      const keys = (issue as { keys: string[] }).keys;
      const keyLine = loaded.lineOf([...path, keys[0]]);
      return new UserError(`unknown key${keys.length > 1 ? 's' : ''} ${keys.map((k) => `'${k}'`).join(', ')}. Remove ${keys.length > 1 ? 'them' : 'it'} or check the spelling.`, { file: loaded.file, line: keyLine ?? line, field: field || undefined });
    }
    case 'invalid_type':
      message = found === undefined ? `missing; expected ${(issue as { expected: string }).expected}. Add this field.` : `expected ${(issue as { expected: string }).expected}, found ${describeValue(found)}.`;
      break;
    default:
      message = `${issue.message}${found !== undefined ? ` (found ${describeValue(found)})` : ''}.`;
  }
  return new UserError(message, { file: loaded.file, line, field: field || undefined });
}
