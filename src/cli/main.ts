/**
 * The `hoarfrost` command line. Each verb lives in commands/<verb>.ts and
 * exports `register(program, ctx)`; heavy modules are imported inside the
 * action so that `hoarfrost --help` stays fast.
 */
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Command, CommanderError } from 'commander';
import { isUserError } from '../config/errors.ts';
import { forTerminal, terminalSafe } from '../config/terminal.ts';
import { TOOL_VERSION } from '../config/version.ts';

export interface CommandContext {
  /** Set the process exit code for the running action. */
  setExitCode(code: number): void;
  stdout: NodeJS.WritableStream;
  stderr: NodeJS.WritableStream;
}

export type RegisterCommand = (program: Command, ctx: CommandContext) => void;

/** A reader that closed the pipe (`hoarfrost ... | head`) is not an error of the run. */
function quietOnClosedPipe(stream: NodeJS.WriteStream): void {
  stream.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
    throw e;
  });
}

/** What the machine refused (a folder that cannot be written, a full disk), said as such: a fault of the surroundings, not of the tool. */
const FILE_SYSTEM_REFUSALS: Record<string, string> = {
  EACCES: 'permission denied. Check that you may write there, or choose another output folder',
  EPERM: 'operation not permitted. Check that you may write there, or choose another output folder',
  EROFS: 'the file system is read-only. Choose an output folder on a writable disk',
  ENOSPC: 'the disk is full. Free some space, or choose an output folder on another disk',
  EDQUOT: 'the disk quota is used up. Free some space, or choose an output folder on another disk',
  ENOTDIR: 'a part of this path is a file, not a folder. Choose another path, or move the file away',
  EMKDIR: 'the folder cannot be made (a read-only disk, or a parent folder you may not write). Choose an output folder on a writable disk',
};

function fileSystemMessage(e: unknown): string | undefined {
  const err = e as NodeJS.ErrnoException | undefined;
  // Node's recursive mkdir reports a read-only or forbidden parent as ENOENT.
  const code = err?.code === 'ENOENT' && err.syscall === 'mkdir' ? 'EMKDIR' : err?.code;
  const advice = typeof code === 'string' ? FILE_SYSTEM_REFUSALS[code] : undefined;
  if (!advice || typeof err?.path !== 'string') return undefined;
  return `${err.path}: cannot ${err.syscall ?? 'write'}: ${advice}.`;
}

export async function main(argv: string[]): Promise<number> {
  quietOnClosedPipe(process.stdout);
  quietOnClosedPipe(process.stderr);
  let exitCode = 0;
  const ctx: CommandContext = {
    setExitCode: (code) => {
      exitCode = code;
    },
    // Names and cells from user files reach the terminal through these (and the messages below).
    stdout: terminalSafe(process.stdout),
    stderr: terminalSafe(process.stderr),
  };
  const program = new Command('hoarfrost')
    .description('Compare observed ice and gas column densities with grids of gas-grain chemistry models.')
    .version(TOOL_VERSION, '-V, --version')
    .showHelpAfterError('(run with --help for usage)')
    .exitOverride();
  const dir = join(dirname(fileURLToPath(import.meta.url)), 'commands');
  const files = readdirSync(dir).filter((f) => f.endsWith('.ts')).sort();
  for (const f of files) {
    const mod = (await import(pathToFileURL(join(dir, f)).href)) as { register?: RegisterCommand };
    mod.register?.(program, ctx);
  }
  for (const sub of program.commands) sub.exitOverride();
  try {
    await program.parseAsync(argv);
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.code === 'commander.helpDisplayed' || e.code === 'commander.version' || e.code === 'commander.help') return 0;
      return e.exitCode === 0 ? 0 : 2;
    }
    if (isUserError(e)) {
      process.stderr.write(`hoarfrost: ${forTerminal(e.message)}\n`);
      return e.exitCode;
    }
    const fsMessage = fileSystemMessage(e);
    if (fsMessage) {
      process.stderr.write(`hoarfrost: ${forTerminal(fsMessage)}\n`);
      return 2;
    }
    const err = e as Error;
    process.stderr.write(`hoarfrost: internal error: ${forTerminal(err?.message ?? String(e))}\nThis is a fault of the tool, not of your input; please report it with the command you ran${process.env.HOARFROST_DEBUG ? '' : ' (set HOARFROST_DEBUG=1 to see the stack)'}.\n`);
    if (process.env.HOARFROST_DEBUG) process.stderr.write(`${err?.stack}\n`);
    return 70;
  }
  return exitCode;
}
