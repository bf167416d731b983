import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const BIN = fileURLToPath(new URL('../../bin/rectboost.js', import.meta.url));

/** Runs the built CLI (bin/rectboost.js → dist/) and returns its exit status and output. */
export function runCli(args: readonly string[], options: { cwd?: string; timeoutMs?: number } = {}): { status: number | null; stdout: string; stderr: string } {
  const result = spawnSync(process.execPath, [BIN, ...args], {
    cwd: options.cwd,
    encoding: 'utf8',
    timeout: options.timeoutMs ?? 120_000,
  });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}
