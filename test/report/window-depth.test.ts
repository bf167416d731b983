import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { resolveScanOptions, scanScales, type ScanOptions } from '../../src/detect/scan-image.js';
import { evaluateNormalizedFeature } from '../../src/features/evaluate-feature.js';
import { createGrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage, type IntegralImage } from '../../src/image/integral-image.js';
import { windowStatistics } from '../../src/image/window-statistics.js';
import type { Box } from '../../src/metrics/intersection-over-union.js';
import { windowDepthNearBox } from '../../src/report/window-depth.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { randomCascadeModel } from '../helpers/scan-twin.js';
import { twinWeakOutput } from '../helpers/window-twin.js';

/**
 * Stages passed by one window, the obvious way on the whole image's integral
 * table: training's evaluateNormalizedFeature at the window's scale, outputs
 * summed in order, stopping at the first stage below its threshold.
 */
function twinStagesPassed(model: CascadeModel, integral: IntegralImage, window: Box, scale: number): number {
  const [x, y, width, height] = window;
  if (windowStatistics(integral, x, y, width, height).standardDeviation === 0) return 0;
  let passed = 0;
  for (const stage of model.stages) {
    let score = 0;
    for (const weak of stage.weakClassifiers) {
      score += twinWeakOutput(weak, (feature) => evaluateNormalizedFeature(integral, feature, x, y, model.window.width, model.window.height, scale));
    }
    if (score < stage.threshold) break;
    passed++;
  }
  return passed;
}

describe('windowDepthNearBox', () => {
  const model = randomCascadeModel('depth-model', [1, 2, 3, 2, 4]);
  const detector = detectorCascadeFromModel(model);
  const image = randomGrayImage(90, 70, 'depth-image');
  const integral = computeIntegralImage(image);
  const options: ScanOptions = { scaleStep: 1.2, shift: 1.5 };
  const scales = scanScales(detector, image.width, image.height, options);

  it('picks a window the scan visits, at the scale nearest to the box in log ratio', () => {
    const random = seedrandom('depth-boxes');
    for (let trial = 0; trial < 40; trial++) {
      const width = 8 + random() * 50;
      const box: Box = [random() * 60, random() * 40, width, width * (0.7 + 0.4 * random())];
      const depth = windowDepthNearBox(detector, image, box, options)!;
      const [x, y, w, h] = depth.window;
      // Brute force over the scan's scales: the chosen size has the smallest summed |log ratio|.
      const distances = scales.map((s) => Math.abs(Math.log(Math.round(12 * s) / box[2])) + Math.abs(Math.log(Math.round(10 * s) / box[3])));
      const best = distances.indexOf(Math.min(...distances));
      const scale = scales[best]!;
      expect([w, h]).toEqual([Math.round(12 * scale), Math.round(10 * scale)]);
      const step = Math.max(1, Math.round(resolveScanOptions(options).shift * scale));
      expect(x % step).toBe(0);
      expect(y % step).toBe(0);
      expect(x + w).toBeLessThanOrEqual(image.width);
      expect(y + h).toBeLessThanOrEqual(image.height);
    }
  });

  it('reports the stages passed that a window-by-window twin finds on the whole image', () => {
    const random = seedrandom('depth-twin');
    const seen = new Set<number>();
    for (let trial = 0; trial < 60; trial++) {
      const width = 10 + random() * 40;
      const box: Box = [random() * 60, random() * 40, width, width * 0.85];
      const depth = windowDepthNearBox(detector, image, box, options)!;
      const scale = scales.find((s) => Math.round(12 * s) === depth.window[2] && Math.round(10 * s) === depth.window[3])!;
      expect(depth.stagesPassed).toBe(twinStagesPassed(model, integral, depth.window, scale));
      seen.add(depth.stagesPassed);
    }
    // The random cascade rejects at several depths, so the comparison covers more than one outcome.
    expect(seen.size).toBeGreaterThanOrEqual(3);
  });

  it('says flat, with no stage passed, for a box on a uniform image', () => {
    const flat = createGrayImage(40, 40, new Uint8Array(1600).fill(90));
    expect(windowDepthNearBox(detector, flat, [5, 5, 12, 10])).toEqual({ window: [5, 5, 12, 10], stagesPassed: 0, flat: true });
  });

  it('returns null when no scan window fits the image', () => {
    expect(windowDepthNearBox(detector, createGrayImage(8, 8), [0, 0, 8, 8])).toBeNull();
  });
});
