import seedrandom from 'seedrandom';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { trainStage, type StageTrainingOptions } from '../../src/boost/train-stage.js';
import { enumerateFeatures } from '../../src/features/enumerate-features.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { createBoostingPool, type BoostingPool } from '../../src/parallel/boosting-pool.js';
import { describeWithReferenceData } from '../data/reference-files.js';
import { loadLfwPatches } from '../boost/lfw-patches.js';

describeWithReferenceData('boosting pool', ['lfw_subset.npy'], () => {
  let one: BoostingPool;
  let two: BoostingPool;
  beforeAll(async () => {
    one = await createBoostingPool(1);
    two = await createBoostingPool(2);
  });
  afterAll(async () => {
    await one.close();
    await two.close();
  });

  const { trainFaces, trainOthers, testFaces } = loadLfwPatches();
  const base = (booster: 'discrete' | 'gentle'): Omit<StageTrainingOptions, 'pool' | 'random'> => ({
    // Every 3rd feature keeps the test quick; a false-positive target of 1e-9 (i.e. zero
    // of 50 negatives) makes the stage take several rounds, so many splits are compared.
    features: enumerateFeatures(25, 25).filter((_, i) => i % 3 === 0),
    positives: packWindowSamples(trainFaces, 25, 25),
    negatives: packWindowSamples(trainOthers, 25, 25),
    validationPositives: packWindowSamples(testFaces, 25, 25),
    booster,
    minDetectionRate: 0.99,
    maxFalsePositiveRate: 1e-9,
    maxWeakClassifiers: 8,
  });

  for (const booster of ['discrete', 'gentle'] as const) {
    it(`gives byte-identical stages with 1 worker, 2 workers and no pool (${booster})`, async () => {
      const inThread = await trainStage({ ...base(booster), random: seedrandom('pool') });
      const withOne = await trainStage({ ...base(booster), pool: one, random: seedrandom('pool') });
      const withTwo = await trainStage({ ...base(booster), pool: two, random: seedrandom('pool') });
      expect(inThread.stage.weakClassifiers.length).toBeGreaterThanOrEqual(3);
      expect(JSON.stringify(withOne.stage)).toBe(JSON.stringify(inThread.stage));
      expect(JSON.stringify(withTwo.stage)).toBe(JSON.stringify(withOne.stage));
      expect([withTwo.detectionRate, withTwo.falsePositiveRate]).toEqual([inThread.detectionRate, inThread.falsePositiveRate]);
    });
  }

  for (const booster of ['discrete', 'gentle'] as const) {
    it(`gives byte-identical stages of depth-2 trees with 1 worker, 2 workers and no pool (${booster})`, async () => {
      const options = { ...base(booster), weakDepth: 2, maxWeakClassifiers: 4 };
      const inThread = await trainStage({ ...options, random: seedrandom('pool-trees') });
      const withOne = await trainStage({ ...options, pool: one, random: seedrandom('pool-trees') });
      const withTwo = await trainStage({ ...options, pool: two, random: seedrandom('pool-trees') });
      expect(inThread.stage.weakClassifiers.some((weak) => 'tree' in weak)).toBe(true);
      expect(JSON.stringify(withOne.stage)).toBe(JSON.stringify(inThread.stage));
      expect(JSON.stringify(withTwo.stage)).toBe(JSON.stringify(withOne.stage));
    });
  }

  it('refuses work after close', async () => {
    const pool = await createBoostingPool(1);
    await pool.close();
    await expect(trainStage({ ...base('gentle'), pool, random: seedrandom('x') })).rejects.toThrow(/closed/);
  });
});
