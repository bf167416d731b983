import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { trainCascade } from '../../src/cascade/build-cascade.js';
import { BackgroundWindows, sampleUniformNegatives } from '../../src/cascade/negative-mining.js';
import { acceptSamples } from '../../src/detect/window-list.js';
import { twinStagesPassed } from '../helpers/window-twin.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { syntheticBackground, syntheticObject } from '../helpers/synthetic-data.js';

const SIDE = 12;

function makeData(seed: string, positives: number, backgrounds: number) {
  const random = seedrandom(seed);
  return {
    positives: Array.from({ length: positives }, () => syntheticObject(SIDE, random)),
    backgrounds: Array.from({ length: backgrounds }, () => syntheticBackground(120, 90, random)),
  };
}

describe('cascade training (in process, generated data)', () => {
  const train = makeData('cascade-train', 300, 8);
  const fresh = makeData('cascade-fresh', 300, 8);
  const options = {
    windowWidth: SIDE,
    windowHeight: SIDE,
    positives: train.positives,
    backgrounds: train.backgrounds,
    stageDetectionRate: 0.99,
    stageFalsePositiveRate: 0.5,
    targetFalsePositiveRate: 1e-4,
    maxStages: 4,
    maxWeakClassifiers: 30,
    negativesPerStage: 400,
    booster: 'gentle' as const,
    mirror: false,
    validationShare: 0.25,
    seed: 3,
    memoryBytes: 2 ** 30,
  };
  let result: Awaited<ReturnType<typeof trainCascade>>;

  it('trains stages that each meet their targets on their own training data', async () => {
    result = await trainCascade(options);
    expect(result.stages.length).toBeGreaterThanOrEqual(3);
    for (const stage of result.stages) {
      expect(stage.training!.detectionRate).toBeGreaterThanOrEqual(0.99);
      if (stage.training!.stoppedBecause === 'targets-met') expect(stage.training!.falsePositiveRate).toBeLessThanOrEqual(0.5);
    }
  });

  it('lets through fresh background windows at about the product of the stage rates', () => {
    const product = result.stages.reduce((p, stage) => p * stage.training!.falsePositiveRate, 1);
    const windows = new BackgroundWindows(fresh.backgrounds, SIDE, SIDE);
    const sample = sampleUniformNegatives(windows, 20_000, seedrandom('fresh-windows')).negatives;
    const passed = acceptSamples(detectorCascadeFromModel({ window: { width: SIDE, height: SIDE }, stages: result.stages }), packWindowSamples(sample, SIDE, SIDE));
    const measured = passed.reduce((n, p) => n + p, 0) / sample.length;
    // Tolerance. Below: a factor of 3, for the counting noise of rates measured on 400 negatives.
    // Above: a stage's rate on its own training negatives is optimistic for fresh windows, and the
    // optimism compounds over stages. The mining of stage k+1 measures the real rate of the first
    // k stages on backgrounds (negatives found / windows scanned); on this data it was 2.6× the
    // product after stage 1 (whose rate rests on 4 of 400 windows), 2.2× after 2 and 1.3× after 3,
    // and the fresh rate after 4 stages 3.7×. Allowing 1.6× per stage and 1.5× noise gives
    // 1.6^K · 1.5 ≈ 9.8 for K = 4: within an order of magnitude, as the counts allow.
    const K = result.stages.length;
    expect(measured).toBeGreaterThan(product / 3);
    expect(measured).toBeLessThan(product * 1.6 ** K * 1.5);
    // And the cascade keeps most fresh positives: about d^K (Viola & Jones 2001 §5).
    const kept = acceptSamples(detectorCascadeFromModel({ window: { width: SIDE, height: SIDE }, stages: result.stages }), packWindowSamples(fresh.positives, SIDE, SIDE));
    const detection = kept.reduce((n, p) => n + p, 0) / fresh.positives.length;
    expect(detection).toBeGreaterThan(0.99 ** result.stages.length - 0.08);
  });

  it('gives identical stages when resumed from its first two stages', async () => {
    const resumed = await trainCascade({ ...options, completedStages: result.stages.slice(0, 2) });
    expect(JSON.stringify(resumed.stages)).toBe(JSON.stringify(result.stages));
  });

  it('returns the finished stages with stop reason interrupted when the interrupt flag is raised', async () => {
    // Raised before the first stage: nothing finished, and nothing is made up.
    const before = await trainCascade({ ...options, shouldStop: () => true });
    expect(before.stopReason).toBe('interrupted');
    expect(before.stages).toEqual([]);
    // Raised once stage 1 is done: stage 1 is returned as trained, the stage in progress dropped.
    let finished = 0;
    const after = await trainCascade({ ...options, onStageFinished: async () => void finished++, shouldStop: () => finished >= 1 });
    const whole = await trainCascade({ ...options, maxStages: 1 });
    expect(after.stopReason).toBe('interrupted');
    expect(after.stages).toEqual(whole.stages);
  });
});

describe('cascade training with negative patches and augmented positives (generated data)', () => {
  const train = makeData('cascade-train', 300, 8);
  const random = seedrandom('look-alikes');
  // Look-alikes: the object's blob without its dark ring (the background's bright spots are of this kind).
  const lookAlikes = Array.from({ length: 150 }, () => {
    const patch = syntheticObject(SIDE, random);
    const data = patch.data.map((v) => Math.max(v, 110));
    return { ...patch, data };
  });
  const options = {
    windowWidth: SIDE,
    windowHeight: SIDE,
    positives: train.positives,
    backgrounds: train.backgrounds,
    stageDetectionRate: 0.99,
    stageFalsePositiveRate: 0.5,
    targetFalsePositiveRate: 1e-4,
    maxStages: 4,
    maxWeakClassifiers: 30,
    negativesPerStage: 400,
    booster: 'gentle' as const,
    mirror: false,
    validationShare: 0.25,
    seed: 3,
    memoryBytes: 2 ** 30,
  };

  it('takes into every stage the patches its cascade still accepts, up to the share, and mines the rest', async () => {
    const result = await trainCascade({ ...options, negativePatches: lookAlikes, negativePatchShare: 0.25 });
    const cap = Math.floor(400 * 0.25); // 100 of the 400 negatives
    result.stages.forEach((stage, k) => {
      // Brute-force twin: count the patches that the first k stages accept (all of them before stage 1).
      const passed = twinStagesPassed({ stages: result.stages.slice(0, k) }, lookAlikes);
      const accepted = k === 0 ? lookAlikes.length : passed.filter((p) => p === k).length;
      expect(stage.training!.negativesFromPatches).toBe(Math.min(cap, accepted));
      expect(result.reports[k]!.negativesFromPatches).toBe(Math.min(cap, accepted));
      expect(stage.training!.negatives).toBe(400);
    });
  });

  it('augments only the training side: validation keeps the real positives', async () => {
    const plain = await trainCascade({ ...options, maxStages: 1 });
    const augmented = await trainCascade({ ...options, maxStages: 1, augmentCopies: 2 });
    // 300 positives, 75 held out (round(300 · 0.25)); the 225 training ones get 2 copies each.
    expect(plain.validationPositives).toBe(75);
    expect(augmented.validationPositives).toBe(75);
    expect(augmented.trainingPositives).toBe(225 * 3);
    expect(JSON.stringify(augmented.stages)).not.toBe(JSON.stringify(plain.stages));
    const again = await trainCascade({ ...options, maxStages: 1, augmentCopies: 2 });
    expect(JSON.stringify(again.stages)).toBe(JSON.stringify(augmented.stages));
  });
});
