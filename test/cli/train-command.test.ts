import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import seedrandom from 'seedrandom';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { weakClassifierDepth } from '../../src/cascade/cascade-model.js';
import { parseCascadeModel } from '../../src/cascade/model-json.js';
import { runCli } from '../helpers/run-cli.js';
import { syntheticBackground, writeSyntheticTrainingData } from '../helpers/synthetic-data.js';

const BIN = fileURLToPath(new URL('../../bin/rectboost.js', import.meta.url));
const root = mkdtempSync(join(tmpdir(), 'rectboost-train-'));
let data: { positives: string; backgrounds: string };
let savedCheckpoint = '';

// Small, fast settings: 12×12 window (a few thousand features), 3 stages at most.
const SMALL = ['--window', '12x12', '--max-stages', '3', '--max-weak', '20', '--negatives', '200', '--stage-detection', '0.98', '--seed', '5', '--no-timing', '--quiet'];

beforeAll(async () => {
  writeFileSync(join(root, 'tiny.png'), await sharp(Buffer.alloc(100, 90), { raw: { width: 10, height: 10, channels: 1 } }).png().toBuffer());
  data = await writeSyntheticTrainingData(root, { positives: 200, backgrounds: 6, size: 12, backgroundWidth: 120, backgroundHeight: 90, seed: 'train-cli' });
});

function train(out: string, extra: string[] = []): ReturnType<typeof runCli> {
  return runCli(['train', '--positives', data.positives, '--backgrounds', data.backgrounds, '--out', out, ...SMALL, ...extra]);
}

describe('rectboost train', () => {
  it('writes a valid model whose stages each met their targets', () => {
    const out = join(root, 'model.json');
    const result = train(out, ['--workers', '1']);
    expect(result.stderr).toBe('');
    expect(result.status).toBe(0);
    const model = parseCascadeModel(readFileSync(out, 'utf8'), out);
    expect(model.stages.length).toBeGreaterThanOrEqual(2);
    for (const stage of model.stages) {
      expect(stage.training!.detectionRate).toBeGreaterThanOrEqual(0.98);
      if (stage.training!.stoppedBecause === 'targets-met') expect(stage.training!.falsePositiveRate).toBeLessThanOrEqual(0.5);
    }
    expect(model.training!.data.positives).toBe(200);
    // Without --weak-depth the provenance has no weakDepth: stump runs keep the fingerprint they had.
    expect(model.training!.options['weakDepth']).toBeUndefined();
    expect(model.training!.timing).toBeUndefined();
    expect(existsSync(`${out.replace(/\.json$/, '')}.checkpoint`)).toBe(false);
  });

  it('trains with --negative-patches and --augment, recording where each stage\'s negatives came from and the patches\' hash', async () => {
    const patches = join(root, 'negative-patches');
    mkdirSync(patches, { recursive: true });
    const random = seedrandom('negative-patches');
    for (let k = 0; k < 30; k++) {
      writeFileSync(join(patches, `n${k}.png`), await sharp(Buffer.from(syntheticBackground(16, 16, random).data), { raw: { width: 16, height: 16, channels: 1 } }).png().toBuffer());
    }
    const out = join(root, 'patches.json');
    const result = runCli(['train', '--positives', data.positives, '--backgrounds', data.backgrounds, '--out', out, ...SMALL.filter((a) => a !== '--quiet'),
      '--negative-patches', patches, '--negative-patch-share', '0.25', '--augment', '1', '--workers', '1']);
    expect(result.status).toBe(0);
    const model = parseCascadeModel(readFileSync(out, 'utf8'), out);
    expect(model.training!.data.negativePatches).toBe(30);
    expect(model.training!.data.negativePatchesHash).toMatch(/^[0-9a-f]{64}$/);
    expect(model.training!.options['negativePatchShare']).toBe(0.25);
    expect(model.training!.options['augment']).toBe(1);
    // Stage 1 accepts every patch: all 30 fit in a quarter of its 200 negatives.
    expect(model.stages[0]!.training!.negativesFromPatches).toBe(30);
    expect(result.stderr).toMatch(/stage 1 saved: .*200 negatives \(30 negative patches, 170 mined\)/);
    expect(result.stderr).toMatch(/stage\s+weak\s+detection\s+false pos\.\s+overall f\.p\.\s+negatives\s+patches/);
  });

  it('trains small decision trees with --weak-depth 2, records the depth, and the model detects and exports like any other', () => {
    const out = join(root, 'trees.json');
    // (--validation 0: on these 200 easy synthetic positives one depth-2 tree already separates
    // the training samples perfectly, which ends boosting; with held-out positives the stage
    // then cannot keep 0.98 of them, so thresholds are set on the training positives here)
    const result = train(out, ['--weak-depth', '2', '--validation', '0', '--workers', '2']);
    expect(result.stderr).toBe('');
    expect(result.status).toBe(0);
    const model = parseCascadeModel(readFileSync(out, 'utf8'), out);
    expect(model.training!.options['weakDepth']).toBe(2);
    const depths = model.stages.flatMap((stage) => stage.weakClassifiers.map(weakClassifierDepth));
    expect(Math.max(...depths)).toBe(2);
    const inspect = runCli(['inspect', out]);
    expect(inspect.status).toBe(0);
    expect(inspect.stdout).toMatch(/weak classifiers: \d+ decision trees \(depth ≤ 2\), \d+ stumps/);
    // Both exports take trees (their scans are compared with detect in test/detect and test/runtime).
    const exported = runCli(['export', out, '--out', join(root, 'trees.runtime.json'), '--c', join(root, 'trees-c')]);
    expect(exported.status).toBe(0);
  });

  it('refuses --weak-depth outside 1..3 as a usage error', () => {
    const result = train(join(root, 'never.json'), ['--weak-depth', '4']);
    expect(result.status).toBe(2);
    expect(result.stderr).toMatch(/--weak-depth/);
  });

  it('trains --features extended on 2 workers: an extended model that may use tilted kinds, recorded, and detect scans with it', () => {
    const out = join(root, 'extended.json');
    const result = train(out, ['--workers', '2', '--features', 'extended']);
    expect(result.stderr).toBe('');
    expect(result.status).toBe(0);
    const model = parseCascadeModel(readFileSync(out, 'utf8'), out);
    expect(model.featureSet).toBe('extended');
    expect(model.training!.options['features']).toBe('extended');
    expect(model.stages.length).toBeGreaterThanOrEqual(1);
    const image = join(data.backgrounds, 'b000.png');
    const detected = runCli(['detect', out, image]);
    expect(detected.status).toBe(0);
    expect(detected.stderr).toMatch(/^detect: 1 images, [\d.]+k windows/);
  });

  it('is deterministic: same data, options and seed give byte-identical models, with 1 or 2 workers', () => {
    const a = join(root, 'same-a.json');
    const b = join(root, 'same-b.json');
    const c = join(root, 'same-c.json');
    expect(train(a, ['--workers', '1']).status).toBe(0);
    expect(train(b, ['--workers', '1']).status).toBe(0);
    expect(train(c, ['--workers', '2']).status).toBe(0);
    expect(readFileSync(b, 'utf8')).toBe(readFileSync(a, 'utf8'));
    expect(readFileSync(c, 'utf8')).toBe(readFileSync(a, 'utf8'));
  });

  it('on Ctrl-C writes the finished stages as a model, and resumes to the same model as an uninterrupted run', async () => {
    const whole = join(root, 'whole.json');
    expect(train(whole, ['--workers', '1']).status).toBe(0);
    const out = join(root, 'resumed.json');
    const args = ['train', '--positives', data.positives, '--backgrounds', data.backgrounds, '--out', out, ...SMALL.filter((a) => a !== '--quiet'), '--workers', '1'];
    const child = spawn(process.execPath, [BIN, ...args], { stdio: ['ignore', 'pipe', 'pipe'] });
    let stderr = '';
    let signalled = false;
    child.stderr.on('data', (chunk: Buffer) => {
      stderr += chunk.toString();
      if (!signalled && /stage 1 saved/.test(stderr)) {
        signalled = true;
        child.kill('SIGINT');
      }
    });
    const status = await new Promise<number | null>((resolve) => child.on('close', resolve));
    expect(signalled).toBe(true);
    expect(status).toBe(1);
    expect(stderr).toMatch(/Training interrupted after [12] finished stages?: .*resumed\.json holds them as a usable model \(stop reason "interrupted"\), and .*resumed\.checkpoint keeps them for --resume\. Run the same command with --resume to continue\./);
    // The interrupted run leaves a valid model of its finished stages beside the checkpoint.
    const interrupted = parseCascadeModel(readFileSync(out, 'utf8'), out);
    expect(interrupted.training!.stopReason).toBe('interrupted');
    expect(interrupted.stages.length).toBeGreaterThanOrEqual(1);
    savedCheckpoint = readFileSync(join(root, 'resumed.checkpoint', 'progress.json'), 'utf8');
    const resumed = runCli([...args, '--resume']);
    expect(resumed.status).toBe(0);
    expect(resumed.stderr).toMatch(/resuming after [12] finished stage/);
    expect(readFileSync(out, 'utf8')).toBe(readFileSync(whole, 'utf8'));
  });

  it('refuses to resume with different options, naming the difference', async () => {
    const out = join(root, 'mismatch.json');
    const checkpoint = join(root, 'mismatch.checkpoint');
    mkdirSync(checkpoint, { recursive: true });
    const saved = JSON.parse(savedCheckpoint) as { fingerprint: Record<string, unknown> };
    expect(saved.fingerprint.booster).toBe('gentle');
    saved.fingerprint.booster = 'discrete';
    writeFileSync(join(checkpoint, 'progress.json'), JSON.stringify(saved));
    const result = train(out, ['--resume', '--workers', '1']);
    expect(result.status).toBe(1);
    expect(result.stderr).toMatch(/was made with booster = "discrete", but this run has "gentle"/);
  });
});

describe('rectboost train refuses bad input before any work, leaving no output file', () => {
  const cases: Array<[string, () => string[], number, RegExp]> = [
    ['too few positives', () => ['--positives', fewPositives(), '--backgrounds', data.backgrounds], 1, /needs at least 3 positive patches; .* has 2/],
    ['a window bigger than every background', () => ['--positives', data.positives, '--backgrounds', smallBackgrounds()], 1, /Every background image in .* is smaller than the 12×12 window/],
    ['an unreadable folder', () => ['--positives', join(root, 'nowhere'), '--backgrounds', data.backgrounds], 1, /Positives .*nowhere do not exist or cannot be read\./],
    ['an unknown booster', () => ['--positives', data.positives, '--backgrounds', data.backgrounds, '--booster', 'fancy'], 2, /--booster must be one of discrete, gentle; received "fancy"\./],
    ['a rate outside its range', () => ['--positives', data.positives, '--backgrounds', data.backgrounds, '--stage-false-positive', '1.5'], 2, /--stage-false-positive must be a number from 0\.001 to 0\.999/],
    ['corrupt background images', () => ['--positives', data.positives, '--backgrounds', corruptBackgrounds()], 1, /2 of 3 background images cannot be used; .*--skip-bad[\s\S]*broken-1\.png[\s\S]*broken-2\.png/],
  ];
  for (const [name, args, status, message] of cases) {
    it(name, () => {
      const out = join(root, `bad-${name.replace(/\W+/g, '-')}.json`);
      const result = runCli(['train', ...args(), '--out', out, '--window', '12x12', '--quiet']);
      expect(result.status).toBe(status);
      expect(result.stderr).toMatch(message);
      expect(result.stderr).not.toMatch(/\n\s+at /);
      expect(existsSync(out)).toBe(false);
    });
  }
});

function fewPositives(): string {
  const folder = join(root, 'few');
  mkdirSync(folder, { recursive: true });
  for (const name of ['p0000.png', 'p0001.png']) writeFileSync(join(folder, name), readFileSync(join(data.positives, name)));
  return folder;
}

function smallBackgrounds(): string {
  const folder = join(root, 'small-backgrounds');
  mkdirSync(folder, { recursive: true });
  // A flat 10×10 image: readable, but smaller than the 12×12 window.
  writeFileSync(join(folder, 'tiny.png'), readFileSync(join(root, 'tiny.png')));
  return folder;
}

function corruptBackgrounds(): string {
  const folder = join(root, 'corrupt-backgrounds');
  mkdirSync(folder, { recursive: true });
  writeFileSync(join(folder, 'good.png'), readFileSync(join(data.backgrounds, 'b000.png')));
  writeFileSync(join(folder, 'broken-1.png'), 'not an image');
  writeFileSync(join(folder, 'broken-2.png'), Buffer.alloc(0));
  return folder;
}
