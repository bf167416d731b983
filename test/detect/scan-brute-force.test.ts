import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { scanImage } from '../../src/detect/scan-image.js';
import { enumerateFeatures } from '../../src/features/enumerate-features.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { hitStrings, randomCascadeModel, scanTwin } from '../helpers/scan-twin.js';

describe('scan against a brute-force twin', () => {
  it('accepts exactly the windows that per-window evaluateNormalizedFeature (scaledFeatureCells) accepts, at every scale', () => {
    const random = seedrandom('brute');
    const features = enumerateFeatures(12, 10);
    const model: CascadeModel = {
      format: 'rectboost-cascade', version: 1, window: { width: 12, height: 10 }, normalization: 'window-standard-deviation', featureSet: 'basic',
      stages: [2, 4].map((size) => ({
        threshold: 0,
        weakClassifiers: Array.from({ length: size }, () => ({ feature: features[Math.floor(random() * features.length)]!, splitValue: random() - 0.5, belowOutput: -random(), aboveOutput: random() })),
      })),
    };
    const image = randomGrayImage(50, 40, 'brute-image');
    const integral = computeIntegralImage(image);
    const options = { scaleStep: 1.3, shift: 1.5 };
    const { hits } = scanImage(detectorCascadeFromModel(model), integral, options);
    // The twin walks every window of every scale on its own (shift 1.5: steps of round(1.5 · scale)).
    const expected = scanTwin(model, integral, options).hits;
    expect(expected.length).toBeGreaterThan(20);
    expect(hitStrings(hits)).toEqual(expected.sort());
  });
});

describe('scan against a brute-force twin, for every shape of first stage', () => {
  // Stage 0 of a one-pixel-shift row is fed straight from the row (σ computed on
  // the way); every other stage, and stage 0 at larger shifts, runs over the
  // compacted list. A one-stage cascade reports stage 0's margins as scores.
  // Every shape must give the twin's hits, scores and counters. The twin decides
  // per window with evaluateNormalizedFeature and sums outputs from 0 in
  // classifier order, so scores (sums of outputs minus the threshold) must match exactly.
  const shapes: { name: string; stageSizes: number[] }[] = [
    { name: 'one classifier, then two stages', stageSizes: [1, 3, 2] },
    { name: 'two classifiers, then one stage', stageSizes: [2, 3] },
    { name: 'three classifiers, then one stage', stageSizes: [3, 2] },
    { name: 'a single stage of two classifiers', stageSizes: [2] },
    { name: 'a single stage of one classifier', stageSizes: [1] },
  ];
  for (const { name, stageSizes } of shapes) {
    it(`${name}: same hits, scores, rejections by stage and weak classifiers evaluated`, () => {
      const model = randomCascadeModel(`shape-${name}`, stageSizes);
      const image = randomGrayImage(46, 38, `shape-image-${name}`);
      const integral = computeIntegralImage(image);
      // Scale 1.3: windows shift by one pixel at the first two scales, by two after.
      const options = { scaleStep: 1.3, shift: 1 };
      const { hits, statistics } = scanImage(detectorCascadeFromModel(model), integral, options);
      const twin = scanTwin(model, integral, options);
      expect(twin.hits.length).toBeGreaterThan(10);
      expect(twin.statistics.rejectedAtStage[0]).toBeGreaterThan(10); // the first stage does reject: the test can tell decisions apart
      expect(hitStrings(hits)).toEqual(twin.hits.sort());
      expect(statistics.flatWindows).toBe(0); // uniform random pixels: no window has variance < 1e-4
      expect(statistics.rejectedAtStage).toEqual(twin.statistics.rejectedAtStage);
      expect(statistics.featuresEvaluated).toBe(twin.statistics.featuresEvaluated);
    });
  }
});

describe('scan of free-form weighted rectangles (runtime files)', () => {
  it('accepts exactly what a per-window four-corner sum accepts, for 1- and 3-rectangle classifiers', async () => {
    const { rectangleSum } = await import('../../src/image/integral-image.js');
    const { windowStatistics } = await import('../../src/image/window-statistics.js');
    const one = [{ x: 2, y: 1, width: 5, height: 4, weight: 1 }];
    const three = [{ x: 0, y: 0, width: 3, height: 3, weight: 2 }, { x: 6, y: 5, width: 4, height: 2, weight: -1 }, { x: 9, y: 0, width: 3, height: 10, weight: -0.5 }];
    const cascade = {
      windowWidth: 12, windowHeight: 10,
      stages: [{ threshold: 0.5, weakClassifiers: [
        { rectangles: one, splitValue: 300, belowOutput: 0, aboveOutput: 1 },
        { rectangles: three, splitValue: 0, belowOutput: 0, aboveOutput: 1 },
      ] }],
    };
    const image = randomGrayImage(40, 30, 'free-form');
    const integral = computeIntegralImage(image);
    const { hits } = scanImage(cascade, integral, { largestSide: 12 });
    const expected: string[] = [];
    for (let y = 0; y + 10 <= 30; y++) for (let x = 0; x + 12 <= 40; x++) {
      const sigma = windowStatistics(integral, x, y, 12, 10).standardDeviation;
      let score = 0;
      for (const weak of cascade.stages[0]!.weakClassifiers) {
        const value = weak.rectangles.reduce((total, r) => total + r.weight * rectangleSum(integral.sum, integral.stride, x + r.x, y + r.y, r.width, r.height), 0);
        score += value / sigma < weak.splitValue ? weak.belowOutput : weak.aboveOutput;
      }
      if (score >= 0.5) expected.push(`${x},${y}`);
    }
    const found = Array.from({ length: hits.count }, (_, i) => `${hits.x[i]},${hits.y[i]}`);
    expect(expected.length).toBeGreaterThan(20);
    expect(expected.length).toBeLessThan(31 * 21); // not everything: the test can tell decisions apart
    expect(found.sort()).toEqual(expected.sort());
  });
});

describe('decisions at exact ties (split equal to a window normalized value)', () => {
  // At scale 1 a basic feature's value is an exact integer (integer weights times
  // integer table entries), and the scan's 1/σ is documented as 1 / √(T²·(1/n) − (T·(1/n))²)
  // with T, T² the window's sum and sum of squares and n its pixel count. So the test
  // can form the scan's own normalized value p = value · (1/σ) and put the split
  // exactly there: value · (1/σ) < split is false at split = p (the window passes,
  // above output +1) and true one ulp above (it fails, below output −1). Any
  // rescaling of the value or of 1/σ, however small, would move some of these.
  const nextUp = (value: number): number => {
    const bits = new BigInt64Array(new Float64Array([value]).buffer);
    bits[0] = value >= 0 ? bits[0]! + 1n : bits[0]! - 1n;
    return new Float64Array(bits.buffer)[0]!;
  };
  for (const [copies, shift] of [[1, 1], [2, 1], [3, 1], [2, 2]] as const) {
    it(`first stage of ${copies} identical classifier${copies > 1 ? 's' : ''}, windows ${shift === 1 ? 'fed from the row (one-pixel shift)' : 'listed (two-pixel shift)'}`, async () => {
      const { rectangleSum } = await import('../../src/image/integral-image.js');
      const { featureCells } = await import('../../src/features/haar-feature.js');
      const image = randomGrayImage(30, 24, `ties-${copies}`);
      const integral = computeIntegralImage(image);
      const features = enumerateFeatures(12, 10);
      const random = seedrandom(`ties-windows-${copies}`);
      for (let trial = 0; trial < 12; trial++) {
        const feature = features[Math.floor(random() * features.length)]!;
        // a window on the scan's grid (multiples of the shift)
        const x = shift * Math.floor((random() * 19) / shift);
        const y = shift * Math.floor((random() * 15) / shift);
        const cells = featureCells(feature);
        const value = cells.reduce((total, cell) => total + cell.weight * rectangleSum(integral.sum, integral.stride, x + cell.x, y + cell.y, cell.width, cell.height), 0);
        const inverseCount = 1 / 120;
        const mean = rectangleSum(integral.sum, integral.stride, x, y, 12, 10) * inverseCount;
        const variance = rectangleSum(integral.squaredSum, integral.stride, x, y, 12, 10) * inverseCount - mean * mean;
        const normalized = value * (1 / Math.sqrt(variance));
        const passes = (split: number): boolean => {
          const weak = { rectangles: cells, splitValue: split, belowOutput: -1, aboveOutput: 1 };
          const cascade = { windowWidth: 12, windowHeight: 10, stages: [{ threshold: 0, weakClassifiers: Array.from({ length: copies }, () => weak) }] };
          const { hits } = scanImage(cascade, integral, { largestSide: 12, shift });
          return Array.from({ length: hits.count }, (_, i) => hits.x[i] === x && hits.y[i] === y).some(Boolean);
        };
        expect(passes(normalized)).toBe(true);
        expect(passes(nextUp(normalized))).toBe(false);
      }
    });
  }
});
