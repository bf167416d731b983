import { describe, expect, it } from 'vitest';
import { evaluateDetections } from '../../src/metrics/detection-evaluation.js';
import { findCasesToReview, findPatchCases } from '../../src/report/cases.js';

// Two images worked by hand with VOC matching at IoU ≥ 0.5:
// image 0: truth A = [0,0,10,10], B = [50,50,10,10]; detections d0 [0,0,10,10] score 0.9 (IoU 1 with A: found),
//          d1 [1,0,10,10] score 0.8 (IoU 90/110 ≈ 0.82 with A, already taken: a duplicate, false),
//          d2 [100,100,10,10] score 0.95 (no overlap: false). B is missed.
// image 1: truth C = [20,20,10,10]; detection e0 [40,40,10,10] score 0.5 (false). C is missed.
const images = [
  {
    truth: [[0, 0, 10, 10], [50, 50, 10, 10]] as Array<[number, number, number, number]>,
    detections: [
      { box: [0, 0, 10, 10] as [number, number, number, number], score: 0.9 },
      { box: [1, 0, 10, 10] as [number, number, number, number], score: 0.8 },
      { box: [100, 100, 10, 10] as [number, number, number, number], score: 0.95 },
    ],
  },
  { truth: [[20, 20, 10, 10]] as Array<[number, number, number, number]>, detections: [{ box: [40, 40, 10, 10] as [number, number, number, number], score: 0.5 }] },
];

describe('findCasesToReview', () => {
  it('lists the unmatched truth boxes and the false alarms, highest score first', () => {
    const cases = findCasesToReview(images, 0.5);
    expect(cases.missed).toEqual([{ image: 0, box: [50, 50, 10, 10] }, { image: 1, box: [20, 20, 10, 10] }]);
    expect(cases.falseAlarms).toEqual([
      { image: 0, box: [100, 100, 10, 10], score: 0.95 },
      { image: 0, box: [1, 0, 10, 10], score: 0.8 },
      { image: 1, box: [40, 40, 10, 10], score: 0.5 },
    ]);
  });

  it('agrees with evaluateDetections: misses = truth − matched, false alarms = detections − matched', () => {
    const cases = findCasesToReview(images, 0.5);
    const evaluation = evaluateDetections(images, 0.5);
    expect(cases.missedTotal).toBe(evaluation.truthCount - evaluation.truePositives);
    expect(cases.falseAlarmTotal).toBe(evaluation.detectionCount - evaluation.truePositives);
  });

  it('keeps at most `limit` of each kind but counts them all', () => {
    const cases = findCasesToReview(images, 0.5, 1);
    expect(cases.missed).toHaveLength(1);
    expect(cases.falseAlarms).toEqual([{ image: 0, box: [100, 100, 10, 10], score: 0.95 }]);
    expect([cases.missedTotal, cases.falseAlarmTotal]).toEqual([2, 3]);
  });
});

describe('findPatchCases', () => {
  it('takes positives that stop before the last stage and negatives that pass every stage, the latter by score', () => {
    // A 3-stage cascade. Positives: sample 1 stops after 2 stages (missed), sample 0 passes all.
    // Negatives: samples 0 and 2 pass all 3 stages (scores 3.2 and 3.5: sample 2 first); sample 1 stops at 1.
    const positives = { scores: Float64Array.from([3.1, 1.6]), stagesPassed: Int32Array.from([3, 2]) };
    const negatives = { scores: Float64Array.from([3.2, 0.4, 3.5]), stagesPassed: Int32Array.from([3, 1, 3]) };
    const cases = findPatchCases(positives, negatives, 3);
    expect(cases.missed).toEqual([{ sample: 1, stagesPassed: 2, score: 1.6 }]);
    expect(cases.falseAlarms.map((c) => c.sample)).toEqual([2, 0]);
    expect([cases.missedTotal, cases.falseAlarmTotal]).toEqual([1, 2]);
  });
});
