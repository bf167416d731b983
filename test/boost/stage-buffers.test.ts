import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { stageBuffersForRun } from '../../src/boost/stage-buffers.js';
import { trainStage, type StageTrainingOptions } from '../../src/boost/train-stage.js';
import { enumerateFeatures } from '../../src/features/enumerate-features.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { randomGrayImage } from '../helpers/random-image.js';

const SIDE = 10;
const features = enumerateFeatures(SIDE, SIDE);
const windows = (prefix: string, count: number) => packWindowSamples(Array.from({ length: count }, (_, i) => randomGrayImage(SIDE, SIDE, `${prefix}${i}`)), SIDE, SIDE);

function stageOptions(seed: string, positives: number, negatives: number): StageTrainingOptions {
  const trainingPositives = windows(`${seed}p`, positives);
  return {
    features, positives: trainingPositives, negatives: windows(`${seed}n`, negatives), validationPositives: trainingPositives,
    booster: 'gentle', minDetectionRate: 0.99, maxFalsePositiveRate: 0.3, maxWeakClassifiers: 4, random: seedrandom(seed),
  };
}

describe('stage buffers shared by the stages of a run', () => {
  it('give every stage the model it gets in fresh memory, whatever an earlier stage left behind', async () => {
    // Twin: the same stage trained in buffers of its own. The run's buffers are first filled
    // by a larger stage, so stale bins, weights and columns beyond the second stage's prefix
    // would show up as a different stage if any were read.
    const buffers = stageBuffersForRun(features, SIDE, SIDE, 90, 2 ** 32, false);
    const larger = stageOptions('first', 40, 50);
    const smaller = stageOptions('second', 25, 30);
    const first = await trainStage({ ...larger, buffers });
    const second = await trainStage({ ...smaller, buffers });
    expect(JSON.stringify(first.stage)).toBe(JSON.stringify((await trainStage(stageOptions('first', 40, 50))).stage));
    expect(JSON.stringify(second.stage)).toBe(JSON.stringify((await trainStage(stageOptions('second', 25, 30))).stage));
  });

  it('hold no more table than the memory cap, and the stage samples features to fit it', async () => {
    // 55 samples × 100 features = 5,500 bytes: the cap the table is made with.
    const buffers = stageBuffersForRun(features, SIDE, SIDE, 55, 5500, false);
    expect(buffers.bins.byteLength).toBe(5500);
    const result = await trainStage({ ...stageOptions('capped', 25, 30), memoryBytes: 5500, buffers });
    expect(result.featuresUsed).toBe(100);
  });

  it('refuse a stage larger than the run they were made for', async () => {
    const buffers = stageBuffersForRun(features, SIDE, SIDE, 20, 2 ** 32, false);
    await expect(trainStage({ ...stageOptions('big', 25, 30), buffers })).rejects.toThrow(/does not fit/);
  });
});
