import { readFileSync } from 'node:fs';

/** The tool version, from package.json: part of every model's content hash and of the provenance. */
export const TOOL_VERSION: string = (JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string }).version;
