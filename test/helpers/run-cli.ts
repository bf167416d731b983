import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const BIN = fileURLToPath(new URL('../../bin/rectboost.js', import.meta.url));

/** Options of runCli: working folder, time limit, text on standard input, extra environment variables. */
export interface RunCliOptions {
  cwd?: string;
  timeoutMs?: number;
  input?: string;
  env?: Readonly<Record<string, string>>;
}

/** Runs the built CLI (bin/rectboost.js → dist/) and returns its exit status and output. */
export function runCli(args: readonly string[], options: RunCliOptions = {}): { status: number | null; stdout: string; stderr: string } {
  const result = spawnSync(process.execPath, [BIN, ...args], {
    cwd: options.cwd,
    encoding: 'utf8',
    timeout: options.timeoutMs ?? 120_000,
    ...(options.input === undefined ? {} : { input: options.input }),
    ...(options.env === undefined ? {} : { env: { ...process.env, ...options.env } }),
  });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}
