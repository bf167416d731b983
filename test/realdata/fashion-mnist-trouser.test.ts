// Source of the data: Fashion-MNIST (Xiao, Rasul & Vollgraf 2017, "Fashion-MNIST: a novel
// image dataset for benchmarking machine learning algorithms", arXiv:1708.07747): 60,000
// training and 10,000 test items of 28×28 gray, ten classes, class 1 = trouser. Files from
// Debian's dataset-fashion-mnist, copied into reference-data/fashion-mnist/ by
// scripts/fetch-reference-data.sh.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { trainCascade, type CascadeTrainingResult } from '../../src/cascade/build-cascade.js';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { loadFashionMnist, type FashionMnistSplit } from '../../src/data/fashion-mnist.js';
import { detectorCascadeFromModel, type DetectorCascade } from '../../src/detect/detector-cascade.js';
import { mergeDetections } from '../../src/detect/merge-detections.js';
import { scanImage } from '../../src/detect/scan-image.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import type { GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { evaluateDetections, type DetectionEvaluation } from '../../src/metrics/detection-evaluation.js';
import { evaluatePatches, type PatchEvaluation } from '../../src/metrics/patch-evaluation.js';
import { truePositiveRateAt } from '../../src/metrics/roc-curve.js';
import { createBoostingPool, type BoostingPool } from '../../src/parallel/boosting-pool.js';
import { REFERENCE_DATA, describeWithReferenceData } from '../data/reference-files.js';
import { buildMosaicScenes, FASHION_SIDE, MOSAIC_ITEMS } from './fashion-mosaics.js';
import { expectStagePassRatesMatchStagesPassed } from './stage-pass-check.js';

/**
 * The object class: trouser (label 1). Two parallel legs with a dark gap between them and dark
 * margins on both sides is a shape no other class has (a dress is one solid trapezoid, a bag a
 * box with handles), so a handful of rectangle features can key on it — a fair first real-data
 * target for a Haar-like cascade. Bag (8) was the other candidate; its handles and prints vary
 * far more within the class.
 */
const TROUSER = 1;
const SIDE = FASHION_SIDE;

/** Subset sizes chosen for run time on 2 shared cores (see the figures below). */
const TRAINING_TROUSERS = 500;
const BACKGROUND_MOSAICS = 24;
const TEST_SCENES = 16;

const FOLDER = REFERENCE_DATA + 'fashion-mnist';

const needed = ['train-images-idx3-ubyte.gz', 'train-labels-idx1-ubyte.gz', 't10k-images-idx3-ubyte.gz', 't10k-labels-idx1-ubyte.gz'];

describeWithReferenceData('Fashion-MNIST trouser against the rest', needed.map((name) => `fashion-mnist/${name}`), () => {
  let pool: BoostingPool | undefined;
  let test: FashionMnistSplit;
  let result: CascadeTrainingResult;
  let model: Pick<CascadeModel, 'window' | 'stages'>;
  let detector: DetectorCascade;
  let patches: PatchEvaluation;
  let detections: DetectionEvaluation;

  beforeAll(async () => {
    const train = await loadFashionMnist(FOLDER, 'train');
    test = await loadFashionMnist(FOLDER, 'test');

    // Training subset: the first 500 trousers of the training split, and the first 24 × 64 =
    // 1,536 items of the other nine classes, in file order, tiled into 24 background mosaics.
    const positives: GrayImage[] = [];
    const others: GrayImage[] = [];
    train.images.forEach((item, i) => {
      if (train.labels[i] === TROUSER) {
        if (positives.length < TRAINING_TROUSERS) positives.push(item);
      } else if (others.length < BACKGROUND_MOSAICS * MOSAIC_ITEMS ** 2) {
        others.push(item);
      }
    });
    const perMosaic = MOSAIC_ITEMS ** 2;
    const backgrounds = buildMosaicScenes(others, [], TROUSER).map((scene) => scene.image);

    pool = await createBoostingPool(2);
    // Each stage boosts over a seeded sample of ⌊30e6 / samples⌋ ≈ 22,000 of the 299,880
    // features (trainStage's memory fallback), which keeps training near 40 s on busy cores.
    result = await trainCascade({
      windowWidth: SIDE,
      windowHeight: SIDE,
      positives,
      backgrounds,
      stageDetectionRate: 0.99,
      stageFalsePositiveRate: 0.5,
      targetFalsePositiveRate: 1e-4,
      maxStages: 10,
      maxWeakClassifiers: 30,
      negativesPerStage: 1000,
      booster: 'gentle',
      mirror: false,
      validationShare: 0.3,
      seed: 11,
      memoryBytes: 30e6,
      pool,
    });
    model = { window: { width: SIDE, height: SIDE }, stages: result.stages };
    detector = detectorCascadeFromModel(model);

    // Patch level: every one of the 10,000 test items, trousers against the other nine classes.
    const testTrousers = test.images.filter((_, i) => test.labels[i] === TROUSER);
    const testOthers = test.images.filter((_, i) => test.labels[i] !== TROUSER);
    patches = evaluatePatches(detector, packWindowSamples(testTrousers, SIDE, SIDE), packWindowSamples(testOthers, SIDE, SIDE));

    // Detection level: the first 16 × 64 = 1,024 test items, in file order, tiled into 16 scenes
    // with each trouser's cell as its truth box. Every item is 28×28, so the scan runs at the
    // model's own scale only; NMS at IoU 0.3 (DEFAULT_MERGE_OPTIONS) merges the shifted hits.
    const scenes = buildMosaicScenes(test.images.slice(0, TEST_SCENES * perMosaic), Array.from(test.labels.subarray(0, TEST_SCENES * perMosaic)), TROUSER);
    detections = evaluateDetections(
      scenes.map(({ image, truth }) => {
        const { hits } = scanImage(detector, computeIntegralImage(image), { smallestSide: SIDE, largestSide: SIDE });
        return { detections: mergeDetections(hits, { method: 'nms', overlap: 0.3 }), truth };
      }),
      0.5,
    );
  });

  afterAll(async () => {
    await pool?.close();
  });

  // Measured on this data with these settings (seeded, so reproducible): training stopped at
  // the target false-positive rate after 8 stages of 3+3+2+6+6+11+7+10 weak classifiers
  // (stage 8 found only 761 of 1,000 negatives in 2.2 million mosaic windows).
  // Patch level over the 10,000 test items (1,000 trousers, 9,000 others): detection rate
  // 0.949 at the cascade's own operating point, false-positive rate 0.021, ROC area 0.983,
  // detection rate 0.944 at a false-positive rate ≤ 1 %. Scenes: 106 trousers, 187
  // detections, 103 true positives, average precision 0.962 at IoU 0.5.
  // Bounds keep a margin of about 7–10 % of each measured figure.
  it('trains until the target false-positive rate is reached', () => {
    expect(result.stopReason).toBe('target-reached');
    expect(result.stages.length).toBeGreaterThanOrEqual(5);
  });

  it('keeps at least 88 % of the test trousers at the cascade operating point (measured 0.949)', () => {
    expect(patches.detectionRate).toBeGreaterThanOrEqual(0.88);
  });

  it('accepts at most 5 % of the other test items (measured 0.021)', () => {
    expect(patches.falsePositiveRate).toBeLessThanOrEqual(0.05);
  });

  it('has ROC area at least 0.95 on the test split, one class against the rest (measured 0.983)', () => {
    expect(patches.roc.area).toBeGreaterThanOrEqual(0.95);
  });

  it('detects at least 85 % of the test trousers at 1 % false positives (measured 0.944)', () => {
    expect(truePositiveRateAt(patches.roc, 0.01)).toBeGreaterThanOrEqual(0.85);
  });

  it('finds trousers in mosaic scenes with average precision at least 0.88 at IoU 0.5 (measured 0.962)', () => {
    // Every trouser among the 1,024 tiled items is a truth box (106 of them, counted from the labels).
    expect(detections.truthCount).toBe(test.labels.subarray(0, TEST_SCENES * MOSAIC_ITEMS ** 2).filter((label) => label === TROUSER).length);
    expect(detections.averagePrecision).toBeGreaterThanOrEqual(0.88);
  });

  it('reports per-stage pass rates that agree with stagesPassed', () => {
    const firstThousand = test.images.slice(0, 1000);
    const labels = Array.from(test.labels.subarray(0, 1000));
    expectStagePassRatesMatchStagesPassed(
      model,
      firstThousand.filter((_, i) => labels[i] === TROUSER),
      firstThousand.filter((_, i) => labels[i] !== TROUSER),
    );
  });
});
