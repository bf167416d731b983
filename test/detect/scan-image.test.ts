import { describe, expect, it } from 'vitest';
import { stagesPassed } from '../../src/cascade/stage-score.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { mergeDetections } from '../../src/detect/merge-detections.js';
import { scanImage, scanScales } from '../../src/detect/scan-image.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { createGrayImage, cropGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { intersectionOverUnion } from '../../src/metrics/intersection-over-union.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { handBuiltCascade, syntheticScene } from '../helpers/synthetic-scene.js';

const cascade = detectorCascadeFromModel(handBuiltCascade());

function detect(image: GrayImage) {
  const { hits, statistics } = scanImage(cascade, computeIntegralImage(image), { scaleStep: 1.25, shift: 1 });
  return { detections: mergeDetections(hits, { method: 'nms', overlap: 0.3 }), statistics, hits };
}

describe('multiscale scan', () => {
  it('finds every object of a synthetic scene with IoU ≥ 0.5 (objects painted at known places and sizes)', () => {
    const { image, truth } = syntheticScene();
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
    const { image } = syntheticScene();
    // Pixels of the scene are in 40..200; halve them so 2·I + 10 stays within 8 bits.
    const halved = createGrayImage(image.width, image.height, image.data.map((v) => v >> 1));
    const brighter = createGrayImage(image.width, image.height, halved.data.map((v) => 2 * v + 10));
    const a = detect(halved);
    const b = detect(brighter);
    expect(a.detections.length).toBeGreaterThan(0);
    expect(b.detections).toEqual(a.detections);
    expect(b.statistics).toEqual(a.statistics);
  });

  it('at scale 1 accepts exactly the windows that training-side stagesPassed accepts (brute-force twin over every position)', () => {
    const { image } = syntheticScene();
    const small = cropGrayImage(image, 0, 0, 60, 50);
    const { hits } = scanImage(cascade, computeIntegralImage(small), { scaleStep: 4, largestSide: 24 });
    const windows: GrayImage[] = [];
    const positions: string[] = [];
    for (let y = 0; y + 24 <= 50; y++) for (let x = 0; x + 24 <= 60; x++) {
      windows.push(cropGrayImage(small, x, y, 24, 24));
      positions.push(`${x},${y}`);
    }
    const passed = stagesPassed(handBuiltCascade(), packWindowSamples(windows, 24, 24));
    const expected = positions.filter((_, i) => passed[i] === 3);
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
    expect(scanScales(cascade, 100, 60).map((s) => Math.round(24 * s))).toEqual([24, 30, 38, 47, 59]);
    expect(scanScales(cascade, 100, 60, { smallestSide: 30, largestSide: 47 }).map((s) => Math.round(24 * s))).toEqual([30, 38, 47]);
  });

  it('a cascade without stages accepts every non-flat window', () => {
    const empty = { windowWidth: 24, windowHeight: 24, stages: [] };
    const image = randomGrayImage(30, 26, 'empty-cascade');
    const { hits } = scanImage(empty, computeIntegralImage(image), { largestSide: 24 });
    // (30 − 24 + 1) · (26 − 24 + 1) = 21 positions at scale 1 only.
    expect(hits.count).toBe(21);
  });
});
