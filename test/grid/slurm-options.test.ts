/**
 * The job-array script's batch options a computing centre asks for: account,
 * memory, QOS and further sbatch lines pass through as #SBATCH directives
 * (sbatch's own option names, Slurm documentation of sbatch); malformed
 * values and options the script sets itself are refused with the fix named.
 */
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/config/errors.ts';
import { slurmScript } from '../../src/grid/slurm.ts';

const BASE = { pipelineFile: '/data/cloud.yaml', outDir: '/data/out', name: 'Invented cloud', shards: 4, cpus: 2, node: '/usr/bin/node' };

function directives(script: string): string[] {
  return script.split('\n').filter((l) => l.startsWith('#SBATCH '));
}

describe('Slurm batch options', () => {
  it('writes account, QOS, memory and extra sbatch lines as directives', () => {
    const script = slurmScript({ ...BASE, account: 'astro-123', qos: 'normal', mem: '4G', extra: ['--constraint=cpu', '--mail-type=END'] });
    const d = directives(script);
    for (const line of ['--account=astro-123', '--qos=normal', '--mem=4G', '--constraint=cpu', '--mail-type=END']) expect(d).toContain(`#SBATCH ${line}`);
    // Directives must precede the first command, or sbatch ignores them.
    const lines = script.split('\n');
    const firstCommand = lines.findIndex((l) => l !== '' && !l.startsWith('#'));
    expect(Math.max(...d.map((x) => lines.indexOf(x)))).toBeLessThan(firstCommand);
  });

  it('writes none of them when not given', () => {
    const d = directives(slurmScript(BASE)).join('\n');
    expect(d).not.toMatch(/--account|--qos|--mem/);
  });

  it.each([
    [{ mem: '4 GB' }, /--mem '4 GB' is not a Slurm memory size/],
    [{ account: 'a;rm -rf' }, /--account 'a;rm -rf' is not an account name/],
    [{ qos: 'high prio' }, /--qos 'high prio' is not a QOS name/],
    [{ extra: ['--constraint=cpu\n#SBATCH --exclusive'] }, /is not one sbatch option/],
    [{ extra: ['constraint=cpu'] }, /write it as --name=value/],
    [{ extra: ['--array=1-9'] }, /sets --array, which the script sets itself/],
    [{ extra: ['--mem=8G'] }, /use the command's own option --mem/],
  ])('refuses %o', (bad, message) => {
    expect(() => slurmScript({ ...BASE, ...bad })).toThrow(UserError);
    expect(() => slurmScript({ ...BASE, ...bad })).toThrow(message);
  });
});
