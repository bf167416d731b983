// SIGKILL cannot be caught, so what it leaves is only what atomic writes guarantee: at any
// moment, either no model file or a complete valid one, and either no checkpoint or one that
// --resume accepts; and resuming gives the same bytes as a run that was never stopped.
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseCascadeModel, validateCascadeModel } from '../../src/cascade/model-json.js';
import { readCheckpoint } from '../../src/io/checkpoint.js';
import { runCli } from '../helpers/run-cli.js';
import { writeSyntheticTrainingData } from '../helpers/synthetic-data.js';

const BIN = fileURLToPath(new URL('../../bin/rectboost.js', import.meta.url));
const CHECKPOINT_WRITER = fileURLToPath(new URL('../helpers/checkpoint-writer.js', import.meta.url));
const root = mkdtempSync(join(tmpdir(), 'rectboost-kill-'));
let data: { positives: string; backgrounds: string };
let uninterrupted = '';

const SETTINGS = ['--window', '12x12', '--max-stages', '4', '--max-weak', '20', '--negatives', '300', '--stage-detection', '0.98', '--seed', '9', '--workers', '1', '--no-timing', '--quiet'];

beforeAll(async () => {
  data = await writeSyntheticTrainingData(root, { positives: 200, backgrounds: 6, size: 12, backgroundWidth: 120, backgroundHeight: 90, seed: 'train-kill' });
  const whole = join(root, 'whole.json');
  expect(runCli(train(whole)).status).toBe(0);
  uninterrupted = readFileSync(whole, 'utf8');
});

function train(out: string): string[] {
  return ['train', '--positives', data.positives, '--backgrounds', data.backgrounds, '--out', out, ...SETTINGS];
}

/** Starts a process and SIGKILLs it `delayMs` after it starts; resolves when it has ended. */
function killAfter(args: string[], delayMs: number): Promise<void> {
  const child = spawn(process.execPath, args, { stdio: 'ignore' });
  const timer = setTimeout(() => child.kill('SIGKILL'), delayMs);
  return new Promise((resolve) => {
    child.on('close', () => {
      clearTimeout(timer);
      resolve();
    });
  });
}

describe('rectboost train killed with SIGKILL', () => {
  // The unstopped run takes about 2 s here: these points fall before the first stage, between
  // stages and in later ones (whatever the machine's speed, each must keep the invariants).
  for (const delayMs of [400, 1100, 1700, 2500]) {
    it(`after ${delayMs} ms leaves no model or a valid one, a checkpoint --resume accepts, and resumes to the same bytes`, async () => {
      const out = join(root, `killed-${delayMs}.json`);
      await killAfter([BIN, ...train(out)], delayMs);
      if (existsSync(out)) expect(() => parseCascadeModel(readFileSync(out, 'utf8'), out)).not.toThrow();
      const progress = join(root, `killed-${delayMs}.checkpoint`, 'progress.json');
      if (existsSync(progress)) {
        const saved = JSON.parse(readFileSync(progress, 'utf8')) as { model: unknown };
        expect(() => validateCascadeModel(saved.model, progress)).not.toThrow();
      }
      const resumed = runCli([...train(out), '--resume']);
      expect(resumed.stderr).toBe('');
      expect(resumed.status).toBe(0);
      expect(readFileSync(out, 'utf8')).toBe(uninterrupted);
    });
  }
});

describe('a checkpoint write killed with SIGKILL', () => {
  // A child rewrites a large checkpoint (8,000 weak classifiers, about 1 MB) in a loop through
  // writeCheckpoint; killed at any moment, the file is the previous or the new one, whole.
  it('always leaves a checkpoint that the resume path reads', async () => {
    let found = 0;
    for (const delayMs of [250, 330, 410, 490, 570, 650]) {
      const folder = join(root, `writer-${delayMs}`);
      await killAfter([CHECKPOINT_WRITER, folder], delayMs);
      const progress = join(folder, 'progress.json');
      if (!existsSync(progress)) continue; // killed before the first write finished: nothing to resume, also valid
      found++;
      const saved = JSON.parse(readFileSync(progress, 'utf8')) as { fingerprint: Record<string, number> };
      const checkpoint = await readCheckpoint(folder, saved.fingerprint);
      expect(checkpoint.model.stages.length).toBe(checkpoint.stageSeconds.length);
    }
    // Node starts in well under 250 ms here, so most kills land after some writes (else this test would prove nothing).
    expect(found).toBeGreaterThanOrEqual(4);
  });
});
