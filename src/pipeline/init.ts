/**
 * `hoarfrost init DIR`: a starting project folder with a pipeline file that
 * lists every option (commented where it is not set), an example
 * observations table with its column mapping, a copy of the default
 * network, and a README line on how to run it. Existing files are never
 * overwritten: if any would be, nothing is written.
 */
import { existsSync, mkdirSync, readFileSync, statSync, statfsSync } from 'node:fs';
import { dirname, isAbsolute, join, relative, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { UserError } from '../config/errors.ts';
import { writeOutput } from '../config/write.ts';

const HERE = dirname(fileURLToPath(import.meta.url));
const ROOT = resolve(HERE, '../..');
/** The example table is the demo's (invented, made from the tool's own models; its header says so). */
const SOURCES = {
  'pipeline.yaml': join(HERE, 'templates/pipeline.yaml'),
  'network.yaml': join(ROOT, 'config/networks/dark-cloud.yaml'),
  'observations.csv': join(ROOT, 'pipelines/demo/sightlines.csv'),
  'observations.columns.yaml': join(ROOT, 'pipelines/demo/sightlines.columns.yaml'),
} as const;
const README_TEMPLATE = join(HERE, 'templates/README.md');
/**
 * Every file `init` reads, found beside this module rather than in the
 * current folder, so that an installed `hoarfrost` finds them wherever it
 * runs (package.json's `files` must ship each one).
 */
export const PROJECT_TEMPLATE_FILES: readonly string[] = [...Object.values(SOURCES), README_TEMPLATE];

/**
 * File systems that are windows onto the kernel, not disks (f_type values of
 * statfs(2), from Linux include/uapi/linux/magic.h): writing a project there
 * fails or hangs (`init /proc/x` never returned).
 */
const KERNEL_FILE_SYSTEMS: Record<number, string> = {
  0x9fa0: 'proc',
  0x62656572: 'sysfs',
  0x27e0eb: 'cgroup',
  0x63677270: 'cgroup2',
  0x64626720: 'debugfs',
  0x74726163: 'tracefs',
  0x73636673: 'securityfs',
  0x1cd1: 'devpts',
  0x6165676c: 'pstore',
  0xcafe4a11: 'bpf',
  0x62656570: 'configfs',
  0x65735543: 'fusectl',
  0xde5e81e4: 'efivarfs',
  0x42494e4d: 'binfmt_misc',
  0x19800202: 'mqueue',
};

/** The kind of kernel file system `target` would be made in, if it is one (devtmpfs shares tmpfs's number, so /dev is named by path). */
function kernelFileSystem(target: string): string | undefined {
  let p = target;
  while (!existsSync(p) && dirname(p) !== p) p = dirname(p);
  if (p === '/dev' || (p.startsWith(`/dev${sep}`) && !p.startsWith(`/dev${sep}shm`))) return 'devtmpfs';
  try {
    return KERNEL_FILE_SYSTEMS[Number(statfsSync(p).type)];
  } catch {
    return undefined;
  }
}

export interface InitResult {
  dir: string;
  files: string[];
}

export function initProject(dir: string, cwd = process.cwd()): InitResult {
  if (dir.trim() === '') throw new UserError("the folder name is empty; give the folder to make, e.g. 'hoarfrost init my-survey' ('.' for the current folder).", { field: 'DIR' });
  const target = resolve(cwd, dir);
  const special = kernelFileSystem(target);
  if (special) throw new UserError(`is on the ${special} file system, a window onto the kernel, not a disk; make the project in your home or work folder.`, { file: dir });
  if (existsSync(target) && !statSync(target).isDirectory()) {
    throw new UserError('exists and is not a folder; give the name of a new or existing folder.', { file: dir });
  }
  const names = [...Object.keys(SOURCES), 'README.md'];
  const clashes = names.filter((n) => existsSync(join(target, n)));
  if (clashes.length > 0) {
    throw new UserError(`would overwrite ${clashes.join(', ')}; nothing was written. Choose an empty folder, or move these files away first.`, { file: dir });
  }
  for (const [name, source] of Object.entries(SOURCES)) {
    if (!existsSync(source)) throw new Error(`the project template file ${source} for ${name} is missing from this installation`);
  }
  mkdirSync(target, { recursive: true });
  for (const [name, source] of Object.entries(SOURCES)) writeOutput(join(target, name), readFileSync(source));
  const rel = relative(cwd, join(target, 'pipeline.yaml'));
  const shown = rel && !rel.startsWith('..') && !isAbsolute(rel) ? rel : join(target, 'pipeline.yaml');
  writeOutput(join(target, 'README.md'), readFileSync(README_TEMPLATE, 'utf8').replace('{{PIPELINE}}', shown));
  return { dir: target, files: names.map((n) => join(target, n)) };
}
