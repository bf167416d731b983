import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { scanImage, scanScales } from '../../src/detect/scan-image.js';
import { enumerateFeatures } from '../../src/features/enumerate-features.js';
import { evaluateNormalizedFeature } from '../../src/features/evaluate-feature.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { randomGrayImage } from '../helpers/random-image.js';

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
    const expected: string[] = [];
    for (const scale of scanScales({ windowWidth: 12, windowHeight: 10 }, 50, 40, options)) {
      const width = Math.round(12 * scale);
      const height = Math.round(10 * scale);
      const step = Math.max(1, Math.round(1.5 * scale));
      for (let y = 0; y + height <= 40; y += step) {
        for (let x = 0; x + width <= 50; x += step) {
          const accepted = model.stages.every((stage) => {
            let score = 0;
            for (const weak of stage.weakClassifiers) {
              score += evaluateNormalizedFeature(integral, weak.feature, x, y, 12, 10, scale) < weak.splitValue ? weak.belowOutput : weak.aboveOutput;
            }
            return score >= stage.threshold;
          });
          if (accepted) expected.push(`${x},${y},${width},${height}`);
        }
      }
    }
    const found = Array.from({ length: hits.count }, (_, i) => `${hits.x[i]},${hits.y[i]},${hits.width[i]},${hits.height[i]}`);
    expect(expected.length).toBeGreaterThan(20);
    expect(found.sort()).toEqual(expected.sort());
  });
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
