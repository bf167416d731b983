// Source of the data: Fashion-MNIST (Xiao, Rasul & Vollgraf 2017, arXiv:1708.07747), from
// Debian's dataset-fashion-mnist, copied into reference-data/fashion-mnist/ by
// scripts/fetch-reference-data.sh. Labels (Xiao et al. 2017, Table 1): 5 sandal, 7 sneaker,
// 9 ankle boot.
import { afterAll, beforeAll, expect, it } from 'vitest';
import { trainCascade, type CascadeTrainingOptions, type CascadeTrainingResult } from '../../src/cascade/build-cascade.js';
import { loadFashionMnist, type FashionMnistSplit } from '../../src/data/fashion-mnist.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { mergeDetections } from '../../src/detect/merge-detections.js';
import { scanImage } from '../../src/detect/scan-image.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { cropBoxToWindow, type GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { evaluateDetections, type DetectionEvaluation } from '../../src/metrics/detection-evaluation.js';
import { detectionErrors, type ImageDetectionsAndTruth } from '../../src/metrics/match-detections.js';
import { evaluatePatches } from '../../src/metrics/patch-evaluation.js';
import { createBoostingPool, type BoostingPool } from '../../src/parallel/boosting-pool.js';
import { REFERENCE_DATA, describeWithReferenceData } from '../data/reference-files.js';
import { buildMosaicScenes, FASHION_SIDE } from './fashion-mosaics.js';

/**
 * The object: sneaker. Its look-alikes are the other two footwear classes, sandal and ankle
 * boot: a low, wide silhouette on the lower half of the item that no garment or bag has. They
 * are 2 in 9 of the background items, but windows aligned on one item are about 1 in 800 of
 * the mosaic positions, so mining alone rarely meets them. (Shirt against T-shirt/top,
 * pullover and coat, the harder pair, is measured by `npm run bench -- accuracy`; see the README.)
 */
const SNEAKER = 7;
const LOOK_ALIKES = [5, 9];

const TRAINING_SNEAKERS = 500;
const BACKGROUND_MOSAICS = 24;
const CONFUSER_PATCHES = 600;
const SCENES_PER_SET = 12;
const PER_MOSAIC = 64;

const needed = ['train-images-idx3-ubyte.gz', 'train-labels-idx1-ubyte.gz', 't10k-images-idx3-ubyte.gz', 't10k-labels-idx1-ubyte.gz'];

describeWithReferenceData('Fashion-MNIST sneaker against its look-alikes: negative patches', needed.map((name) => `fashion-mnist/${name}`), () => {
  let pool: BoostingPool | undefined;
  let test: FashionMnistSplit;
  let plain: CascadeTrainingResult;
  let withConfusers: CascadeTrainingResult;
  let withFalseAlarms: CascadeTrainingResult;
  let heldOutConfusers: GrayImage[];
  let testSneakers: GrayImage[];
  let firstScenes: ImageDetectionsAndTruth[];
  let secondScenesPlain: DetectionEvaluation;
  let secondScenesFedBack: DetectionEvaluation;
  let fedBackCount: number;

  const acceptedShare = (result: CascadeTrainingResult, windows: readonly GrayImage[]): number =>
    evaluatePatches(detectorCascadeFromModel({ window: { width: FASHION_SIDE, height: FASHION_SIDE }, stages: result.stages }), packWindowSamples(windows, FASHION_SIDE, FASHION_SIDE), packWindowSamples([], FASHION_SIDE, FASHION_SIDE)).detectionRate;

  const detectScenes = (result: CascadeTrainingResult, scenes: ReturnType<typeof buildMosaicScenes>): ImageDetectionsAndTruth[] => {
    const detector = detectorCascadeFromModel({ window: { width: FASHION_SIDE, height: FASHION_SIDE }, stages: result.stages });
    return scenes.map(({ image, truth }) => {
      const { hits } = scanImage(detector, computeIntegralImage(image), { smallestSide: FASHION_SIDE, largestSide: FASHION_SIDE });
      return { detections: mergeDetections(hits, { method: 'nms', overlap: 0.3 }), truth };
    });
  };

  beforeAll(async () => {
    const started = performance.now();
    const train = await loadFashionMnist(REFERENCE_DATA + 'fashion-mnist', 'train');
    test = await loadFashionMnist(REFERENCE_DATA + 'fashion-mnist', 'test');

    // Training split, file order: the first 500 sneakers; the first 24 × 64 items of the other
    // nine classes as background mosaics (look-alikes among them at their natural share, 2 in
    // 9); the next 600 look-alike items as confuser patches. Held out: the test split's 2,000
    // sandals and ankle boots, and its 1,000 sneakers.
    const sneakers: GrayImage[] = [];
    const others: GrayImage[] = [];
    const confusers: GrayImage[] = [];
    train.images.forEach((item, i) => {
      const label = train.labels[i]!;
      if (label === SNEAKER) {
        if (sneakers.length < TRAINING_SNEAKERS) sneakers.push(item);
      } else if (others.length < BACKGROUND_MOSAICS * PER_MOSAIC) {
        others.push(item);
      } else if (LOOK_ALIKES.includes(label) && confusers.length < CONFUSER_PATCHES) {
        confusers.push(item);
      }
    });
    const backgrounds = buildMosaicScenes(others, others.map(() => -1), -1).map((scene) => scene.image);
    heldOutConfusers = test.images.filter((_, i) => LOOK_ALIKES.includes(test.labels[i]!));
    testSneakers = test.images.filter((_, i) => test.labels[i] === SNEAKER);

    pool = await createBoostingPool(2);
    const options: CascadeTrainingOptions = {
      windowWidth: FASHION_SIDE,
      windowHeight: FASHION_SIDE,
      positives: sneakers,
      backgrounds,
      stageDetectionRate: 0.99,
      stageFalsePositiveRate: 0.5,
      targetFalsePositiveRate: 1e-6,
      maxStages: 8,
      maxWeakClassifiers: 30,
      negativesPerStage: 1000,
      booster: 'gentle',
      mirror: false,
      validationShare: 0.3,
      seed: 11,
      memoryBytes: 30e6,
      // As `train --keep-going`: a stage that stalls at 30 weak classifiers on confusers still
      // rejects some of them, so training goes on; the plain run follows the same rule.
      stopWhenStalled: false,
      pool,
    };
    const times: number[] = [];
    const timed = async (run: Promise<CascadeTrainingResult>): Promise<CascadeTrainingResult> => {
      const start = performance.now();
      const result = await run;
      times.push((performance.now() - start) / 1000);
      return result;
    };
    plain = await timed(trainCascade(options));
    withConfusers = await timed(trainCascade({ ...options, negativePatches: confusers }));

    // The feedback loop: the false alarms of the plain cascade on a first set of test scenes
    // (test items 0–767), cropped as `evaluate --errors` crops them, become negative patches;
    // a second set of scenes (test items 768–1535) judges both cascades.
    const testScenes = buildMosaicScenes(test.images.slice(0, 2 * SCENES_PER_SET * PER_MOSAIC), Array.from(test.labels.subarray(0, 2 * SCENES_PER_SET * PER_MOSAIC)), SNEAKER);
    firstScenes = detectScenes(plain, testScenes.slice(0, SCENES_PER_SET));
    const falseAlarms = detectionErrors(firstScenes, 0.5).falseAlarms
      .map((error) => cropBoxToWindow(testScenes[error.image]!.image, error.box, FASHION_SIDE, FASHION_SIDE))
      .filter((window): window is GrayImage => window !== undefined);
    fedBackCount = falseAlarms.length;
    withFalseAlarms = await timed(trainCascade({ ...options, negativePatches: falseAlarms }));
    const second = testScenes.slice(SCENES_PER_SET);
    secondScenesPlain = evaluateDetections(detectScenes(plain, second), 0.5);
    secondScenesFedBack = evaluateDetections(detectScenes(withFalseAlarms, second), 0.5);
    const describe = (name: string, result: CascadeTrainingResult): string =>
      `${name}: ${result.stages.length} stages (${result.stages.map((s) => s.weakClassifiers.length).join('+')} weak, ` +
      `patch negatives ${result.reports.map((r) => r.negativesFromPatches).join('/')}), stop ${result.stopReason}, ` +
      `sneakers kept ${acceptedShare(result, testSneakers).toFixed(4)}, look-alikes accepted ${acceptedShare(result, heldOutConfusers).toFixed(4)}`;
    console.log(
      `fashion-mnist sneaker vs look-alikes (${((performance.now() - started) / 1000).toFixed(1)} s): ${describe('backgrounds only', plain)}; ` +
        `${describe('with 600 confuser patches', withConfusers)}; ${describe(`with ${fedBackCount} fed-back false alarms`, withFalseAlarms)}; ` +
        `second scenes: false alarms ${secondScenesPlain.detectionCount - secondScenesPlain.truePositives} → ${secondScenesFedBack.detectionCount - secondScenesFedBack.truePositives}, ` +
        `found ${secondScenesPlain.truePositives} → ${secondScenesFedBack.truePositives} of ${secondScenesPlain.truthCount}, AP ${secondScenesPlain.averagePrecision.toFixed(4)} → ${secondScenesFedBack.averagePrecision.toFixed(4)}; ` +
        `training times ${times.map((t) => t.toFixed(1)).join(' / ')} s`,
    );
  }, 900_000);

  afterAll(async () => {
    await pool?.close();
  });

  it('counts the negative patches each stage used, and mines the rest', () => {
    for (const report of withConfusers.reports) {
      expect(report.negativesFromPatches).toBeGreaterThanOrEqual(0);
      // At most half of each stage's 1,000 negatives (DEFAULT_NEGATIVE_PATCH_SHARE).
      expect(report.negativesFromPatches).toBeLessThanOrEqual(500);
    }
    // Stage 1 sees every patch as accepted (no stages yet), so it takes the full half.
    expect(withConfusers.reports[0]!.negativesFromPatches).toBe(500);
    expect(plain.reports.every((report) => report.negativesFromPatches === 0)).toBe(true);
  });

  // Measured on this data with these settings (seeded, so reproducible): backgrounds only, 7
  // stages (stop: backgrounds exhausted) keep 0.949 of the 1,000 test sneakers and accept 0.1815 of
  // the 2,000 test sandals and ankle boots; with the 600 confuser patches, 8 stages keep 0.909 and
  // accept 0.0425 (95.75 % rejected). Fed back, the plain cascade's 43 false alarms on the first 12
  // scenes cut its false alarms on the second 12 scenes from 50 to 20 (76 of 77 sneakers found by
  // both). Bounds leave a margin where the issue sets none; the 95 % is the issue's.
  it('rejects at least 95 % of held-out look-alikes when trained with confuser patches (measured 95.75 %)', () => {
    expect(acceptedShare(withConfusers, heldOutConfusers)).toBeLessThanOrEqual(0.05);
  });

  it('rejects far fewer of them when trained on backgrounds alone (measured 81.85 %)', () => {
    expect(acceptedShare(plain, heldOutConfusers)).toBeGreaterThan(0.1);
  });

  it('still keeps most test sneakers with confuser patches (measured 0.909, against 0.949 without)', () => {
    expect(acceptedShare(withConfusers, testSneakers)).toBeGreaterThanOrEqual(0.85);
  });

  it('makes fewer false alarms on a second set of scenes after the first set\'s false alarms are fed back (measured 50 → 20)', () => {
    const falseAlarms = (evaluation: DetectionEvaluation): number => evaluation.detectionCount - evaluation.truePositives;
    expect(fedBackCount).toBeGreaterThan(0);
    expect(falseAlarms(secondScenesFedBack)).toBeLessThanOrEqual(0.7 * falseAlarms(secondScenesPlain));
    expect(secondScenesFedBack.truePositives).toBeGreaterThanOrEqual(secondScenesPlain.truePositives - 3);
  });
});
