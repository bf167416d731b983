import { beforeAll, describe, expect, it } from 'vitest';
import { trainCascade } from '../../src/cascade/build-cascade.js';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { twinStagesPassed } from '../helpers/window-twin.js';
import type { DetectorCascade } from '../../src/detect/detector-cascade.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { mergeDetections } from '../../src/detect/merge-detections.js';
import { scanImage, scanScales } from '../../src/detect/scan-image.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { createGrayImage, cropGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { intersectionOverUnion } from '../../src/metrics/intersection-over-union.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { clutteredBackgrounds, syntheticObjectPatches, syntheticScene } from '../helpers/synthetic-scene.js';

// A 12×12 detector trained in the test (Viola & Jones 2001 §5: stages boosted to
// per-stage targets on mined negatives) on invented, seeded data: the painted
// object at varied sizes, levels and noise as positives, noise cluttered with
// blocks and half-objects as backgrounds. With these seeds training ends with
// 2 stages (the second mined from about 131k background windows) in about 1 s.
const SIDE = 12;
let model: CascadeModel;
let cascade: DetectorCascade;

beforeAll(async () => {
  const result = await trainCascade({
    windowWidth: SIDE,
    windowHeight: SIDE,
    positives: syntheticObjectPatches(SIDE, 400, 'scan-positives'),
    backgrounds: clutteredBackgrounds(100, 75, 10, 'scan-backgrounds'),
    stageDetectionRate: 0.995,
    stageFalsePositiveRate: 0.5,
    targetFalsePositiveRate: 1e-3,
    maxStages: 4,
    maxWeakClassifiers: 10,
    negativesPerStage: 300,
    booster: 'gentle',
    mirror: false,
    validationShare: 0.25,
    seed: 5,
    memoryBytes: 2 ** 28,
  });
  model = { format: 'rectboost-cascade', version: 1, window: { width: SIDE, height: SIDE }, normalization: 'window-standard-deviation', featureSet: 'basic', stages: result.stages };
  cascade = detectorCascadeFromModel(model);
}, 60_000);

function detect(image: GrayImage) {
  const { hits, statistics } = scanImage(cascade, computeIntegralImage(image), { scaleStep: 1.25, shift: 1 });
  return { detections: mergeDetections(hits, { method: 'nms', overlap: 0.3 }), statistics, hits };
}

describe('multiscale scan', () => {
  it('uses a trained cascade of more than one stage', () => {
    expect(cascade.stages.length).toBeGreaterThanOrEqual(2);
  });

  it('finds every object of a synthetic scene with IoU ≥ 0.5 (objects painted at known places and sizes)', () => {
    const { image, truth } = syntheticScene(SIDE);
    const { detections } = detect(image);
    for (const box of truth) {
      const best = Math.max(...detections.map((d) => intersectionOverUnion(d.box, box)));
      expect(best, `truth ${box.join(',')}`).toBeGreaterThanOrEqual(0.5);
    }
  });

  it('gives no detections and no NaN on a flat image: every window is flat (variance 0)', () => {
    const flat = createGrayImage(80, 60, new Uint8Array(80 * 60).fill(128));
    const { detections, statistics } = detect(flat);
    expect(detections).toEqual([]);
    expect(statistics.flatWindows).toBe(statistics.windowsScanned);
    expect(statistics.featuresEvaluated).toBe(0);
  });

  it('gives identical detections on a·I + b (a = 2, b = 10) as on I (variance normalization, Viola & Jones 2001 §5.1)', () => {
    const { image } = syntheticScene(SIDE);
    // Pixels of the scene are in 40..200; halve them so 2·I + 10 stays within 8 bits.
    const halved = createGrayImage(image.width, image.height, image.data.map((v) => v >> 1));
    const brighter = createGrayImage(image.width, image.height, halved.data.map((v) => 2 * v + 10));
    const a = detect(halved);
    const b = detect(brighter);
    expect(a.detections.length).toBeGreaterThan(0);
    expect(b.detections).toEqual(a.detections);
    expect(b.statistics).toEqual(a.statistics);
  });

  it('at scale 1 accepts exactly the windows that the window-by-window twin accepts (brute-force twin over every position)', () => {
    const { image } = syntheticScene(SIDE);
    const small = cropGrayImage(image, 0, 0, 40, 30);
    const { hits } = scanImage(cascade, computeIntegralImage(small), { scaleStep: 4, largestSide: SIDE });
    const windows: GrayImage[] = [];
    const positions: string[] = [];
    for (let y = 0; y + SIDE <= 30; y++) for (let x = 0; x + SIDE <= 40; x++) {
      windows.push(cropGrayImage(small, x, y, SIDE, SIDE));
      positions.push(`${x},${y}`);
    }
    const passed = twinStagesPassed(model, windows);
    const expected = positions.filter((_, i) => passed[i] === model.stages.length);
    const found = Array.from({ length: hits.count }, (_, i) => `${hits.x[i]},${hits.y[i]}`);
    expect(expected.length).toBeGreaterThan(0);
    expect(found.sort()).toEqual(expected.sort());
  });

  it('counts every window once: flat + rejected at each stage + accepted = scanned', () => {
    const { statistics } = detect(randomGrayImage(90, 70, 'counts'));
    const rejected = statistics.rejectedAtStage.reduce((a, b) => a + b, 0);
    expect(statistics.flatWindows + rejected + statistics.accepted).toBe(statistics.windowsScanned);
  });

  it('visits scales 1.25^k while the rounded window fits, within the side bounds', () => {
    // 24·1.25^k rounded: 24, 30, 37.5→38, 46.875→47, 58.59→59, 73.2→73; a 60-pixel image fits the first five.
    expect(scanScales({ windowWidth: 24, windowHeight: 24 }, 100, 60).map((s) => Math.round(24 * s))).toEqual([24, 30, 38, 47, 59]);
    expect(scanScales({ windowWidth: 24, windowHeight: 24 }, 100, 60, { smallestSide: 30, largestSide: 47 }).map((s) => Math.round(24 * s))).toEqual([30, 38, 47]);
  });

  it('a cascade without stages accepts every non-flat window', () => {
    const empty = { windowWidth: 24, windowHeight: 24, stages: [] };
    const image = randomGrayImage(30, 26, 'empty-cascade');
    const { hits } = scanImage(empty, computeIntegralImage(image), { largestSide: 24 });
    // (30 − 24 + 1) · (26 − 24 + 1) = 21 positions at scale 1 only.
    expect(hits.count).toBe(21);
  });
});
