// The stalled-stage rule on real faces: scikit-image's lfw_subset.npy (Debian python3-skimage;
// 100 faces of 25×25 from Labeled Faces in the Wild) with the package's face-free sample photos
// as backgrounds, but only 20 training faces. With mirroring, 4 held-out faces give 8 validation
// positives, so a stage detection rate of 0.995 means keeping all 8 (⌈0.995 · 8⌉ = 8): the
// hardest one pins every threshold, stages soon use every weak classifier they may have and
// still pass most negatives. Training must say so and stop, not grind on to its stage limit.
import { afterAll, beforeAll, expect, it } from 'vitest';
import { trainCascade, type CascadeTrainingResult, type TrainingEvent } from '../../src/cascade/build-cascade.js';
import { loadLfwSubset } from '../../src/data/lfw-subset.js';
import { decodeGrayImageFile } from '../../src/io/decode-image.js';
import { createBoostingPool, type BoostingPool } from '../../src/parallel/boosting-pool.js';
import { REFERENCE_DATA, describeWithReferenceData } from '../data/reference-files.js';

const PHOTOS = ['brick.png', 'grass.png', 'gravel.png', 'moon.png', 'page.png', 'text.png', 'rocket.jpg', 'coffee.png', 'horse.png', 'motorcycle_left.png'];
const MAX_STAGES = 20;

describeWithReferenceData('training on too few real faces', ['lfw_subset.npy', ...PHOTOS.map((name) => `photos/${name}`)], () => {
  let pool: BoostingPool | undefined;
  let result: CascadeTrainingResult;
  const warnings: string[] = [];

  beforeAll(async () => {
    const subset = await loadLfwSubset(REFERENCE_DATA + 'lfw_subset.npy');
    const backgrounds = await Promise.all(PHOTOS.map((name) => decodeGrayImageFile(`${REFERENCE_DATA}photos/${name}`)));
    pool = await createBoostingPool(2);
    result = await trainCascade({
      windowWidth: 25,
      windowHeight: 25,
      positives: subset.faces.slice(0, 20),
      backgrounds,
      stageDetectionRate: 0.995,
      stageFalsePositiveRate: 0.5,
      targetFalsePositiveRate: 1e-6,
      maxStages: MAX_STAGES,
      maxWeakClassifiers: 8,
      negativesPerStage: 300,
      booster: 'gentle',
      mirror: true,
      validationShare: 0.2,
      seed: 1,
      memoryBytes: 2 ** 30,
      pool,
      onEvent: (event: TrainingEvent) => {
        if (event.phase === 'warning') warnings.push(event.message);
      },
    });
  });
  afterAll(async () => {
    await pool?.close();
  });

  it('warns at the start that every validation positive must be kept', () => {
    expect(warnings).toEqual([expect.stringMatching(/^Only 8 validation positives: a stage detection rate of 0\.995 means keeping every one of them/)]);
  });

  it('stops early at the first stage that used every weak classifier and missed the false-positive target', () => {
    expect(result.stopReason).toBe('stage-stalled');
    expect(result.stages.length).toBeLessThan(MAX_STAGES);
    const last = result.stages.at(-1)!.training!;
    expect(last.stoppedBecause).toBe('max-weak-classifiers');
    expect(last.falsePositiveRate).toBeGreaterThan(0.5);
    // Every earlier stage met its target (else training would have stopped there).
    for (const stage of result.stages.slice(0, -1)) expect(stage.training!.falsePositiveRate).toBeLessThanOrEqual(0.5);
  });

  it('names the cause and the remedies', () => {
    expect(result.stopMessage).toMatch(/used all 8 weak classifiers and still lets \d+\.\d% of its negatives through \(target 50\.0%\)/);
    expect(result.stopMessage).toMatch(/with 8 validation positives, a stage detection rate of 0\.995 means keeping all 8/);
    expect(result.stopMessage).toMatch(/more \(and more varied\) positives, a lower --stage-detection, a larger --validation share/);
  });
});
