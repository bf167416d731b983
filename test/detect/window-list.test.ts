import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { retuneCascade } from '../../src/cascade/retune.js';
import { trainStage } from '../../src/boost/train-stage.js';
import { enumerateFeatures } from '../../src/features/enumerate-features.js';
import { loadFashionMnist } from '../../src/data/fashion-mnist.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { scanImage } from '../../src/detect/scan-image.js';
import { acceptSamples, cascadeDepths, stageSampleScores } from '../../src/detect/window-list.js';
import { evaluateNormalizedFeature } from '../../src/features/evaluate-feature.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { createGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { cascadeDepthScores } from '../../src/metrics/patch-evaluation.js';
import { REFERENCE_DATA, itWithReferenceData } from '../data/reference-files.js';
import { loadLfwPatches } from '../boost/lfw-patches.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { randomCascadeModel } from '../helpers/scan-twin.js';
import { twinDepth, twinStageScore } from '../helpers/window-twin.js';

/** The next double above (up = true) or below a finite value. */
function nextDouble(value: number, up: boolean): number {
  const bits = new BigInt64Array(new Float64Array([value]).buffer);
  const away = (value >= 0) === up;
  if (value === 0) return up ? Number.MIN_VALUE : -Number.MIN_VALUE;
  bits[0] = away ? bits[0]! + 1n : bits[0]! - 1n;
  return new Float64Array(bits.buffer)[0]!;
}

/** Every list evaluator against the window-by-window twin, bit for bit (Object.is on every number). */
function expectAgreement(model: CascadeModel, windows: readonly GrayImage[]): void {
  const { width, height } = model.window;
  const samples = packWindowSamples(windows, width, height);
  const detector = detectorCascadeFromModel(model);
  const twins = windows.map((window) => twinDepth(model, window));
  const accepted = acceptSamples(detector, samples);
  const depths = cascadeDepths(detector, samples);
  const depthScores = cascadeDepthScores(detector, samples);
  twins.forEach((twin, s) => {
    expect(accepted[s], `accept, sample ${s}`).toBe(twin.stagesPassed === model.stages.length ? 1 : 0);
    expect(depths.stagesPassed[s], `depth, sample ${s}`).toBe(twin.stagesPassed);
    expect(Object.is(depths.margins[s], twin.margin), `margin, sample ${s}: ${depths.margins[s]} vs ${twin.margin}`).toBe(true);
    expect(Object.is(depths.evidence[s], twin.evidence), `evidence, sample ${s}: ${depths.evidence[s]} vs ${twin.evidence}`).toBe(true);
    expect(depthScores.stagesPassed[s]).toBe(twin.stagesPassed);
  });
  model.stages.forEach((stage, k) => {
    const scores = stageSampleScores(detector.stages[k]!, width, height, samples);
    windows.forEach((window, s) => expect(Object.is(scores[s], twinStageScore(stage, window)), `stage ${k} score, sample ${s}`).toBe(true));
  });
  // Both outcomes occur, so the comparison can tell decisions apart.
  expect(accepted.some((a) => a === 1)).toBe(true);
  expect(accepted.some((a) => a === 0)).toBe(true);
}

describe('window lists agree with the window-by-window twin', () => {
  it('on random windows, flat windows among them', () => {
    const windows = Array.from({ length: 300 }, (_, i) => randomGrayImage(12, 10, `list-${i}`));
    windows.push(createGrayImage(12, 10), { width: 12, height: 10, data: new Uint8Array(120).fill(200) });
    const model = randomCascadeModel('lists', [1, 2, 3, 5]);
    // Lower the thresholds so that a fair share of windows reaches the later stages.
    expectAgreement({ ...model, stages: model.stages.map((stage) => ({ ...stage, threshold: stage.threshold - 0.4 })) }, windows);
  });

  it('at exact ties: a split equal to a window’s normalized value, and one ulp either side', () => {
    // The twin's normalized value is value · (1/σ) with the σ rule; at split = that value the
    // window goes above (v < split is false), one ulp up it goes below, one ulp down above.
    const base = randomCascadeModel('ties', [1]);
    const weak = base.stages[0]!.weakClassifiers[0]!;
    const windows = Array.from({ length: 40 }, (_, i) => randomGrayImage(12, 10, `tie-${i}`));
    for (let trial = 0; trial < 10; trial++) {
      const window = windows[trial]!;
      const value = evaluateNormalizedFeature(computeIntegralImage(window), weak.feature, 0, 0, 12, 10);
      for (const split of [value, nextDouble(value, true), nextDouble(value, false)]) {
        const model: CascadeModel = { ...base, stages: [{ threshold: 0.5, weakClassifiers: [{ ...weak, splitValue: split, belowOutput: 0, aboveOutput: 1 }] }] };
        const accepted = acceptSamples(detectorCascadeFromModel(model), packWindowSamples([window], 12, 10));
        expect(accepted[0], `trial ${trial}, split ${split - value} from the value`).toBe(split > value ? 0 : 1);
        expect(accepted[0]).toBe(twinDepth(model, window).stagesPassed);
      }
    }
  });

  itWithReferenceData('on real patches: lfw_subset faces and non-faces (scikit-image)', ['lfw_subset.npy'], () => {
    const { trainFaces, trainOthers } = loadLfwPatches();
    const model = randomCascadeModel('lfw-lists', [2, 3, 4], { width: 25, height: 25 });
    expectAgreement({ ...model, stages: model.stages.map((stage) => ({ ...stage, threshold: stage.threshold - 0.5 })) }, [...trainFaces, ...trainOthers]);
  });

  itWithReferenceData('on real patches: Fashion-MNIST test items (Xiao et al. 2017)', ['fashion-mnist/t10k-images-idx3-ubyte.gz'], async () => {
    const { images } = await loadFashionMnist(REFERENCE_DATA + 'fashion-mnist', 'test');
    const model = randomCascadeModel('fashion-lists', [2, 3, 4], { width: 28, height: 28 });
    expectAgreement({ ...model, stages: model.stages.map((stage) => ({ ...stage, threshold: stage.threshold - 0.5 })) }, images.slice(0, 400));
  });

  it('retuning measures the rates the twin measures', () => {
    const windows = Array.from({ length: 200 }, (_, i) => randomGrayImage(12, 10, `retune-${i}`));
    const model = randomCascadeModel('retune-lists', [3, 3]);
    const { model: tuned, overallDetectionRate } = retuneCascade(model, packWindowSamples(windows, 12, 10), { stageDetectionRate: 0.8 });
    const passed = windows.filter((window) => twinDepth(tuned, window).stagesPassed === 2).length;
    expect(overallDetectionRate).toBe(passed / windows.length);
    expect(passed).toBeGreaterThan(0);
  });
});

/** Tiles windows row by row, `perRow` to a row, into one image. */
function tile(windows: readonly GrayImage[], perRow: number): GrayImage {
  const { width, height } = windows[0]!;
  const image = createGrayImage(perRow * width, Math.ceil(windows.length / perRow) * height);
  windows.forEach((window, k) => {
    for (let row = 0; row < height; row++) image.data.set(window.data.subarray(row * width, (row + 1) * width), (Math.floor(k / perRow) * height + row) * image.width + (k % perRow) * width);
  });
  return image;
}

describe('windows cut from an image score as the same samples do', () => {
  it('a trained stage: detection on an image tiled with its samples reproduces the rates training measured', async () => {
    // Training measures its false-positive rate from the response table (quantized bins,
    // splits at bin edges) and its detection rate from validation scores; detection scans the
    // same windows cut from one image with the kernel's row scan. Equal counts at the stage
    // threshold mean the two paths put every sample on the same side of every split.
    const positives = Array.from({ length: 60 }, (_, i) => {
      const window = randomGrayImage(10, 10, `stage-p${i}`);
      for (let p = 0; p < 100; p++) if (p % 10 < 5) window.data[p] = Math.min(255, window.data[p]! + 25); // brighter left half
      return window;
    });
    const negatives = Array.from({ length: 80 }, (_, i) => randomGrayImage(10, 10, `stage-n${i}`));
    const packed = packWindowSamples(positives, 10, 10);
    const result = await trainStage({
      features: enumerateFeatures(10, 10), positives: packed, negatives: packWindowSamples(negatives, 10, 10), validationPositives: packed,
      booster: 'gentle', minDetectionRate: 0.95, maxFalsePositiveRate: 0.01, maxWeakClassifiers: 2, random: seedrandom('stage'),
    });
    const detector = detectorCascadeFromModel({ window: { width: 10, height: 10 }, stages: [result.stage] });
    const acceptedTiles = (windows: readonly GrayImage[]): number => {
      const { hits } = scanImage(detector, computeIntegralImage(tile(windows, 10)), { largestSide: 10 });
      let count = 0;
      for (let i = 0; i < hits.count; i++) if (hits.x[i]! % 10 === 0 && hits.y[i]! % 10 === 0) count++;
      return count;
    };
    expect(result.falsePositiveRate).toBeGreaterThan(0);
    // (some negatives pass, so the counts can disagree)
    expect(acceptedTiles(negatives) / negatives.length).toBe(result.falsePositiveRate);
    expect(acceptedTiles(positives) / positives.length).toBe(result.detectionRate);
  });

  it('a scan of an image tiled with samples gives, at every tile, the margin the sample tables give, bit for bit', () => {
    const model = randomCascadeModel('tiles', [2, 4]);
    const lowered: CascadeModel = { ...model, stages: model.stages.map((stage) => ({ ...stage, threshold: stage.threshold - 0.5 })) };
    const random = seedrandom('tile-order');
    const windows = Array.from({ length: 64 }, (_, i) => randomGrayImage(12, 10, `tile-${i}-${Math.floor(random() * 1e6)}`));
    const image = createGrayImage(8 * 12, 8 * 10);
    windows.forEach((window, k) => {
      for (let row = 0; row < 10; row++) image.data.set(window.data.subarray(row * 12, row * 12 + 12), (Math.floor(k / 8) * 10 + row) * image.width + (k % 8) * 12);
    });
    const detector = detectorCascadeFromModel(lowered);
    const { hits } = scanImage(detector, computeIntegralImage(image), { largestSide: 12 });
    const atTiles = new Map<number, number>();
    for (let i = 0; i < hits.count; i++) {
      const x = hits.x[i]!;
      const y = hits.y[i]!;
      if (x % 12 === 0 && y % 10 === 0) atTiles.set((y / 10) * 8 + x / 12, hits.score[i]!);
    }
    const { stagesPassed, evidence } = cascadeDepths(detector, packWindowSamples(windows, 12, 10));
    windows.forEach((_, k) => {
      const accepted = stagesPassed[k] === lowered.stages.length;
      expect(atTiles.has(k), `tile ${k}`).toBe(accepted);
      if (accepted) expect(Object.is(atTiles.get(k), evidence[k])).toBe(true);
    });
    expect(atTiles.size).toBeGreaterThan(0);
    expect(atTiles.size).toBeLessThan(windows.length);
  });
});
