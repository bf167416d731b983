// The detection score ranks: a window's score is its evidence, the sum of its margins over
// every stage (RawHits), instead of the last stage's margin alone, which takes few distinct
// values (a sum of that stage's discrete votes) and so ties true and false detections.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseCascadeModel } from '../../src/cascade/model-json.js';
import { loadAnnotations } from '../../src/data/annotations.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { mergeDetections, type Detection } from '../../src/detect/merge-detections.js';
import { scanImage } from '../../src/detect/scan-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { decodeGrayImageFile } from '../../src/io/decode-image.js';
import { evaluateDetections } from '../../src/metrics/detection-evaluation.js';
import type { Box } from '../../src/metrics/intersection-over-union.js';

const MODEL = fileURLToPath(new URL('../fixtures/demo-cascade.json', import.meta.url));
const TRUTH = fileURLToPath(new URL('../../demo-patches/scenes/truth.jsonl', import.meta.url));

describe('the detection score on the demo panels (8-stage demo cascade, default scan, NMS at IoU 0.3)', () => {
  const scenes: Array<{ detections: Detection[]; truth: readonly Box[] }> = [];
  beforeAll(async () => {
    const cascade = detectorCascadeFromModel(parseCascadeModel(readFileSync(MODEL, 'utf8'), MODEL));
    for (const entry of await loadAnnotations(TRUTH)) {
      const { hits } = scanImage(cascade, computeIntegralImage(await decodeGrayImageFile(entry.image)));
      scenes.push({ detections: mergeDetections(hits, { method: 'nms', overlap: 0.3 }), truth: entry.boxes });
    }
  });

  it('ranks true detections above false alarms: average precision at least 0.94 (measured 0.954; the last stage’s margin gave 0.823)', () => {
    // Both figures from `rectboost evaluate test/fixtures/demo-cascade.json --truth demo-patches/scenes/truth.jsonl`
    // before and after the change of score; same hits and boxes, only the order differs.
    expect(evaluateDetections(scenes, 0.5).averagePrecision).toBeGreaterThanOrEqual(0.94);
  });

  it('rarely ties: at least 70% of the 321 detections have a score of their own (the last stage’s margin: 23 distinct values)', () => {
    const scores = scenes.flatMap((scene) => scene.detections.map((detection) => detection.score));
    // Measured: 231 distinct of 321. Ties remain only where windows get the same vote in every stage they pass.
    expect(scores.length).toBe(321);
    expect(new Set(scores).size / scores.length).toBeGreaterThanOrEqual(0.7);
  });
});
