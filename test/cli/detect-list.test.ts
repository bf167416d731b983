import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/run-cli.js';
import { DEMO_CASCADE, writeSceneList } from '../helpers/scene-list.js';

const folder = mkdtempSync(join(tmpdir(), 'rectboost-list-'));
const BIN = fileURLToPath(new URL('../../bin/rectboost.js', import.meta.url));
let list = '';
let listLines: string[] = [];
let broken = '';
/** The whole list in one process, the reference every sharded or resumed run must equal byte for byte. */
let single = '';

function lineNumbers(text: string): number[] {
  return text.trim().split('\n').map((l) => (JSON.parse(l) as { line: number }).line);
}

beforeAll(async () => {
  ({ list, lines: listLines, broken } = await writeSceneList(join(folder, 'images'), 60));
  const out = join(folder, 'single.jsonl');
  const run = runCli(['detect', DEMO_CASCADE, '--list', list, '--no-timing', '--out', out, '--workers', '1']);
  expect(run.status).toBe(1); // the one file that is not an image
  single = readFileSync(out, 'utf8');
});

describe('rectboost detect --list', () => {
  it('writes one line per listed image in list order, with its list line number, and skips the empty lines and the broken file', () => {
    // Expected line numbers straight from the list: non-empty lines other than the broken file.
    const expected = listLines.flatMap((path, k) => (path === '' || path === broken ? [] : [k + 1]));
    expect(lineNumbers(single)).toEqual(expected);
    expect(expected.length).toBeGreaterThan(60); // duplicates are images too
    expect(single).not.toMatch(/milliseconds/);
  });

  it('reads the list from standard input', () => {
    const run = runCli(['detect', DEMO_CASCADE, '--list', '-', '--no-timing', '--workers', '1', '--quiet'], { input: readFileSync(list, 'utf8') });
    expect(run.stdout).toBe(single);
  });

  it('ends with a summary line giving images, windows and detections per second', () => {
    const run = runCli(['detect', DEMO_CASCADE, '--list', list, '--shard', '1/7', '--no-timing', '--workers', '0']);
    const images = run.stdout.trim().split('\n').length;
    expect(run.stderr).toMatch(new RegExp(`^detect: ${images} images, \\S+ windows, \\d+ detections in [\\d.]+ s: [\\d.]+k? images/s, [\\d.]+[kM]? windows/s, [\\d.]+k? detections/s$`, 'm'));
  });

  it('joins 7 shards into exactly the single-process file', () => {
    const shards = join(folder, 'seven');
    for (let k = 0; k < 7; k++) runCli(['detect', DEMO_CASCADE, '--list', list, '--shard', `${k}/7`, '--shard-dir', shards, '--no-timing', '--workers', '0']);
    const joined = join(folder, 'seven.jsonl');
    const run = runCli(['join', shards, '--out', joined]);
    expect(run.status).toBe(0);
    expect(readFileSync(joined, 'utf8')).toBe(single);
  });

  it('takes the shard from SLURM_ARRAY_TASK_ID / SLURM_ARRAY_TASK_COUNT when --shard is not given', () => {
    const fromEnvironment = runCli(['detect', DEMO_CASCADE, '--list', list, '--no-timing', '--workers', '0', '--quiet'], {
      env: { SLURM_ARRAY_TASK_ID: '2', SLURM_ARRAY_TASK_COUNT: '3', SLURM_ARRAY_TASK_MIN: '0', SLURM_ARRAY_TASK_STEP: '1' },
    });
    const explicit = runCli(['detect', DEMO_CASCADE, '--list', list, '--shard', '2/3', '--no-timing', '--workers', '0', '--quiet']);
    expect(fromEnvironment.stdout).toBe(explicit.stdout);
    expect(lineNumbers(explicit.stdout).every((line) => (line - 1) % 3 === 2)).toBe(true);
  });

  it('refuses to join while a shard is missing or unfinished, naming it', () => {
    const shards = join(folder, 'three');
    runCli(['detect', DEMO_CASCADE, '--list', list, '--shard', '0/3', '--shard-dir', shards, '--no-timing', '--workers', '0']);
    runCli(['detect', DEMO_CASCADE, '--list', list, '--shard', '2/3', '--shard-dir', shards, '--no-timing', '--workers', '0']);
    const run = runCli(['join', shards, '--out', join(folder, 'three.jsonl')]);
    expect(run.status).toBe(1);
    expect(run.stderr.trim()).toMatch(/^rectboost: 1 of 3 shards in .* are missing or unfinished \(1\); run them again/);
    expect(existsSync(join(folder, 'three.jsonl'))).toBe(false);
  });

  it('resumes a shard cut off after k images, with a torn last line, and writes each image exactly once', () => {
    const reference = join(folder, 'reference');
    runCli(['detect', DEMO_CASCADE, '--list', list, '--shard', '1/2', '--shard-dir', reference, '--no-timing', '--workers', '0']);
    const complete = readFileSync(join(reference, 'shard-1-of-2.jsonl'), 'utf8');
    const lines = complete.split('\n');
    const k = 11;
    const resumed = join(folder, 'resumed');
    mkdirSync(resumed);
    // What a crash leaves behind: k whole lines and the first half of the next one, no done marker.
    writeFileSync(join(resumed, 'shard-1-of-2.jsonl'), `${lines.slice(0, k).join('\n')}\n${lines[k]!.slice(0, lines[k]!.length >> 1)}`);
    const run = runCli(['detect', DEMO_CASCADE, '--list', list, '--shard', '1/2', '--shard-dir', resumed, '--no-timing', '--workers', '0']);
    expect(run.status).toBe(0); // the broken file is on line 7, which is in shard 0
    expect(run.stderr).toMatch(new RegExp(`\\(${k} skipped as already written\\)`));
    expect(readFileSync(join(resumed, 'shard-1-of-2.jsonl'), 'utf8')).toBe(complete);
    const marker = JSON.parse(readFileSync(join(resumed, 'shard-1-of-2.done.json'), 'utf8')) as { resumedAfter: number; images: number; linesWritten: number };
    expect([marker.resumedAfter, marker.images, marker.linesWritten]).toEqual([k, lines.length - 1 - k, lines.length - 1]);
  });

  it('resumes a run killed (SIGKILL) midway: every image once, and the same bytes as one uninterrupted run', async () => {
    const shards = join(folder, 'killed');
    const file = join(shards, 'shard-0-of-1.jsonl');
    // Denser scan options make each image take long enough to kill the run midway; the reference is made with the same options.
    const options = ['--scale-step', '1.05', '--shift', '0.25', '--no-timing', '--workers', '0', '--concurrency', '1'];
    const child = spawn(process.execPath, [BIN, 'detect', DEMO_CASCADE, '--list', list, '--shard', '0/1', '--shard-dir', shards, ...options], { stdio: 'ignore' });
    const exited = new Promise<void>((resolve) => child.on('exit', () => resolve()));
    let killedAfter = 0;
    for (let waited = 0; waited < 60_000; waited += 10) {
      const text = existsSync(file) ? readFileSync(file, 'utf8') : '';
      killedAfter = text.split('\n').length - 1;
      if (killedAfter >= 3) break;
      await new Promise((resolve) => setTimeout(resolve, 10));
    }
    child.kill('SIGKILL');
    await exited;
    const atKill = readFileSync(file, 'utf8');
    expect(existsSync(join(shards, 'shard-0-of-1.done.json'))).toBe(false);
    const total = lineNumbers(single).length;
    expect(atKill.split('\n').length - 1).toBeLessThan(total); // it really stopped midway
    const rerun = runCli(['detect', DEMO_CASCADE, '--list', list, '--shard', '0/1', '--shard-dir', shards, ...options]);
    expect(rerun.status).toBe(1); // the broken file, again
    const reference = runCli(['detect', DEMO_CASCADE, '--list', list, ...options, '--quiet']);
    const after = readFileSync(file, 'utf8');
    expect(after.startsWith(atKill)).toBe(true); // nothing already written was rewritten
    expect(new Set(lineNumbers(after)).size).toBe(lineNumbers(after).length);
    expect(after).toBe(reference.stdout);
    expect(statSync(join(shards, 'shard-0-of-1.done.json')).size).toBeGreaterThan(0);
  });

  it('refuses to add a shard run with other settings to a shard folder, and counts a runtime export as the same cascade', () => {
    const shards = join(folder, 'settings');
    const base = ['detect', DEMO_CASCADE, '--list', list, '--shard-dir', shards, '--no-timing', '--workers', '0'];
    expect(runCli([...base, '--shard', '0/4']).status).toBe(0); // the broken file (line 7) is in shard 2
    const other = runCli([...base, '--shard', '1/4', '--merge', 'mean']);
    expect(other.status).toBe(1);
    expect(other.stderr).toMatch(/run\.json records other settings .* use a new --shard-dir for a new setup/);
    expect(existsSync(join(shards, 'shard-1-of-4.jsonl'))).toBe(false);
    const exported = join(folder, 'runtime-cascade.json');
    runCli(['export', DEMO_CASCADE, '--out', exported]);
    expect(runCli(['detect', exported, ...base.slice(2), '--shard', '1/4']).status).toBe(0);
  });

  it('refuses images and --list together, and --shard without --list', () => {
    expect(runCli(['detect', DEMO_CASCADE, list, '--list', list]).stderr.trim()).toBe('rectboost: Give image files or folders, or --list FILE, but not both (and not neither).');
    const shardOnly = runCli(['detect', DEMO_CASCADE, join(folder, 'images'), '--shard', '0/2']);
    expect(shardOnly.status).toBe(2);
    expect(shardOnly.stderr).toMatch(/--shard and --shard-dir work on an image list; add --list FILE\./);
  });
});
