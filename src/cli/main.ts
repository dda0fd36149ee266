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

export async function main(argv: string[]): Promise<number> {
  quietOnClosedPipe(process.stdout);
  quietOnClosedPipe(process.stderr);
  let exitCode = 0;
  const ctx: CommandContext = {
    setExitCode: (code) => {
      exitCode = code;
    },
    stdout: process.stdout,
    stderr: process.stderr,
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
      process.stderr.write(`hoarfrost: ${e.message}\n`);
      return e.exitCode;
    }
    const err = e as Error;
    process.stderr.write(`hoarfrost: internal error: ${err?.message ?? String(e)}\nThis is a fault of the tool, not of your input; please report it with the command you ran${process.env.HOARFROST_DEBUG ? '' : ' (set HOARFROST_DEBUG=1 to see the stack)'}.\n`);
    if (process.env.HOARFROST_DEBUG) process.stderr.write(`${err?.stack}\n`);
    return 70;
  }
  return exitCode;
}
