import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/run-cli.js';
import { DEMO_CASCADE, writeSceneList } from '../helpers/scene-list.js';

/*
 * The job-array recipe on a real one-node Slurm cluster (Debian's slurm-wlm and munge,
 * started by scripts/slurm/local-cluster.sh in a folder of this test's own): an array of
 * 4 tasks over 250 list entries, one task killed midway and re-submitted, then the join
 * must equal a single-process detect byte for byte.
 */
const SCRIPTS = fileURLToPath(new URL('../../scripts/slurm/', import.meta.url));
const TASKS = 4;
const KILLED = 2;
/** Same options for the array and the single run; denser than the defaults so that a task runs long enough to be killed midway. */
const OPTIONS = ['--scale-step', '1.1', '--shift', '0.5', '--merge', 'mean', '--min-support', '2', '--concurrency', '1'];

function onPath(program: string): boolean {
  return spawnSync('sh', ['-c', `command -v ${program}`]).status === 0;
}
const missing = ['munged', 'slurmctld', 'slurmd', 'sbatch', 'squeue', 'scancel'].filter((p) => !onPath(p));
const isRoot = process.getuid?.() === 0;
const present = missing.length === 0 && isRoot;
const underCi = process.env['CI'] === 'true';
if (!present && !underCi) {
  console.warn(`Slurm job-array test skipped: ${isRoot ? `${missing.join(', ')} not found (apt-get install -y slurm-wlm munge)` : 'needs root to start the Slurm daemons'}.`);
}

const folder = mkdtempSync(join(tmpdir(), 'rectboost-slurm-'));
const cluster = join(folder, 'cluster');
const environment = { ...process.env, SLURM_CONF: join(cluster, 'slurm.conf') };

function slurm(program: string, args: string[]): string {
  return execFileSync(program, args, { env: environment, encoding: 'utf8' });
}

/** Waits until Slurm lists no task of `job` as pending or running. */
async function waitForJob(job: string, limitSeconds: number): Promise<void> {
  for (let waited = 0; waited < limitSeconds * 1000; waited += 200) {
    if (slurm('squeue', ['--noheader', '--jobs', job, '--format=%i']).trim() === '') return;
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
  throw new Error(`Slurm job ${job} still queued or running after ${limitSeconds} s; see ${folder}/out/logs and ${cluster}/slurmctld.log`);
}

/** Jobs this test submitted. */
const jobs: string[] = [];

function lineCount(path: string): number {
  return existsSync(path) ? readFileSync(path, 'utf8').split('\n').length - 1 : 0;
}

describe.runIf(present || underCi)('Slurm job array (one-node cluster on localhost)', () => {
  beforeAll(() => {
    if (!present) throw new Error(`CI=true but the Slurm test cannot run: ${isRoot ? `${missing.join(', ')} not found; .ci/run must apt-get install slurm-wlm munge` : 'not root'}.`);
    execFileSync('bash', [join(SCRIPTS, 'local-cluster.sh'), 'start', cluster], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'inherit'] });
  });

  afterAll(() => {
    // A failed run may leave tasks of this test's own cluster behind: cancel them before the daemons stop.
    if (jobs.length > 0) spawnSync('scancel', ['--full', '--signal=KILL', ...jobs], { env: environment });
    if (present) execFileSync('bash', [join(SCRIPTS, 'local-cluster.sh'), 'stop', cluster], { stdio: 'inherit' });
  });

  it('joins the shards of a 4-task array, one task killed midway and re-submitted, into exactly the single-process output', async () => {
    const { list, lines } = await writeSceneList(join(folder, 'images'), 240);
    expect(lines.filter((l) => l !== '').length).toBeGreaterThanOrEqual(200);
    const out = join(folder, 'out');
    const shards = join(out, 'shards');

    const submitted = execFileSync('bash', [join(SCRIPTS, 'submit-detect.sh'), '--tasks', String(TASKS), '--cpus', '1', '--then-join', list, DEMO_CASCADE, out, '--', ...OPTIONS], { env: environment, encoding: 'utf8' });
    const job = /Submitted job array (\d+)/.exec(submitted)?.[1];
    expect(job, submitted).toBeDefined();
    const joinJob = /Submitted join job (\d+)/.exec(submitted)?.[1];
    expect(joinJob, submitted).toBeDefined();
    jobs.push(job!, joinJob!);

    // Kill task KILLED once it has written a few images, as a lost node or a time limit would.
    const killedFile = join(shards, `shard-${KILLED}-of-${TASKS}.jsonl`);
    let killedAt = 0;
    for (let waited = 0; waited < 120_000 && killedAt < 3; waited += 20) {
      await new Promise((resolve) => setTimeout(resolve, 20));
      killedAt = lineCount(killedFile);
    }
    slurm('scancel', ['--full', '--signal=KILL', `${job}_${KILLED}`]);
    await waitForJob(job!, 120);
    const share = lines.flatMap((l, k) => (l !== '' && k % TASKS === KILLED ? [k] : [])).length;
    const leftBehind = lineCount(killedFile);
    expect(leftBehind).toBeGreaterThanOrEqual(3);
    expect(leftBehind).toBeLessThan(share); // it did stop midway
    expect(existsSync(join(shards, `shard-${KILLED}-of-${TASKS}.done.json`))).toBe(false);
    // The join job waited for the whole array (afterany) and refused, naming the unfinished shard.
    await waitForJob(joinJob!, 60);
    expect(readFileSync(join(out, 'logs', 'join.log'), 'utf8')).toMatch(new RegExp(`1 of ${TASKS} shards .* are missing or unfinished \\(${KILLED}\\)`));
    expect(existsSync(join(out, 'detections.jsonl'))).toBe(false);

    // Re-submit the killed task alone with the same job script: it resumes.
    const again = slurm('sbatch', ['--parsable', `--array=${KILLED}`, join(out, 'detect-array.sbatch')]).trim().split(';')[0]!;
    jobs.push(again);
    await waitForJob(again, 120);
    const log = readFileSync(join(out, 'logs', `task-${KILLED}.log`), 'utf8');
    expect(log).toMatch(new RegExp(`\\(${leftBehind} skipped as already written`));

    const joined = join(out, 'detections.jsonl');
    const join_ = runCli(['join', shards, '--out', joined]);
    expect(join_.status, join_.stderr).toBe(0);
    const single = join(folder, 'single.jsonl');
    runCli(['detect', DEMO_CASCADE, '--list', list, '--no-timing', '--out', single, '--workers', '2', ...OPTIONS]);
    const expected = readFileSync(single);
    expect(expected.length).toBeGreaterThan(0);
    expect(readFileSync(joined).equals(expected)).toBe(true);
  }, 170_000);
});
