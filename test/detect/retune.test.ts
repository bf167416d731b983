import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { retuneCascade } from '../../src/cascade/retune.js';
import { twinStagesPassed } from '../helpers/window-twin.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { scanImage } from '../../src/detect/scan-image.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { createGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { handBuiltCascade, noiseBackground, paintObject } from '../helpers/synthetic-scene.js';

/** Varied positives: the synthetic object with random contrast, offset and noise. */
function positives(count: number): GrayImage[] {
  const random = seedrandom('retune-positives');
  return Array.from({ length: count }, () => {
    const canvas = noiseBackground(28, 28, String(random()));
    const dark = 30 + Math.floor(random() * 60);
    const bright = dark + 40 + Math.floor(random() * 120);
    paintObject(canvas, Math.floor(random() * 5), Math.floor(random() * 5), 24, dark, bright);
    const window = createGrayImage(24, 24);
    for (let y = 0; y < 24; y++) for (let x = 0; x < 24; x++) {
      window.data[y * 24 + x] = Math.min(255, canvas.data[(y + 2) * 28 + x + 2]! + Math.floor(random() * 30));
    }
    return window;
  });
}

/** A background full of object-like bright blocks of random size and contrast. */
function clutter(): GrayImage {
  const random = seedrandom('retune-clutter');
  const image = noiseBackground(160, 120, 'clutter');
  for (let k = 0; k < 40; k++) {
    const side = 12 + Math.floor(random() * 30);
    const x = Math.floor(random() * (160 - side));
    const y = Math.floor(random() * (120 - side));
    paintObject(image, x, y, side, 60 + Math.floor(random() * 60), 120 + Math.floor(random() * 120));
  }
  return image;
}

describe('retuning stage thresholds', () => {
  const model = handBuiltCascade();
  const windows = positives(300);
  const samples = packWindowSamples(windows, 24, 24);
  const integral = computeIntegralImage(clutter());

  it('keeps at least the asked share of positives at every stage', () => {
    const { stages, overallDetectionRate } = retuneCascade(model, samples, { stageDetectionRate: 0.9 });
    for (const stage of stages) expect(stage.detectionRate).toBeGreaterThanOrEqual(0.9);
    // Overall rate re-measured independently with the window-by-window twin.
    const tuned = retuneCascade(model, samples, { stageDetectionRate: 0.9 }).model;
    const passed = twinStagesPassed(tuned, windows);
    expect(overallDetectionRate).toBe(passed.filter((p) => p === tuned.stages.length).length / samples.count);
  });

  it('lowering the stage detection target lowers the number of background windows that pass, monotonically', () => {
    const counts = [1, 0.99, 0.95, 0.9, 0.8, 0.6, 0.4].map((rate) => {
      const tuned = retuneCascade(model, samples, { stageDetectionRate: rate }).model;
      return scanImage(detectorCascadeFromModel(tuned), integral).statistics.accepted;
    });
    for (let i = 1; i < counts.length; i++) expect(counts[i]!, `counts ${counts.join(', ')}`).toBeLessThanOrEqual(counts[i - 1]!);
    expect(counts.at(-1)!).toBeLessThan(counts[0]!);
  });

  it('a positive final-stage offset only raises the last threshold', () => {
    const { model: tuned } = retuneCascade(model, samples, { finalStageOffset: 0.5 });
    expect(tuned.stages.map((s) => s.threshold)).toEqual([1, 1, 2.5]);
    expect(model.stages[2]!.threshold).toBe(2); // the input model is untouched
  });
});
