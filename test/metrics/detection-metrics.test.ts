import { describe, expect, it } from 'vitest';
import { intersectionOverUnion, type Box } from '../../src/metrics/intersection-over-union.js';
import { detectionErrors, matchDetections } from '../../src/metrics/match-detections.js';
import { logAverageMissRate, missRateCurve } from '../../src/metrics/miss-rate.js';
import { averagePrecision, detectionRateAtFalsePositives, precisionRecallCurve } from '../../src/metrics/precision-recall.js';
import { rocCurve, truePositiveRateAt } from '../../src/metrics/roc-curve.js';

// A hand-worked two-image example (PASCAL VOC matching and AP, Everingham et al. 2010, detection task).
// Image 0 truth: T1 [0,0,10,10], T2 [20,0,10,10]. Image 1 truth: T3 [0,0,10,10].
// Detections by score:
//   0.9 image 0 [0,0,10,10]  IoU(T1) = 1                       → TP
//   0.8 image 0 [5,0,10,10]  IoU(T1) = 50/150 = 1/3 < 0.5      → FP
//   0.7 image 1 [1,1,10,10]  IoU(T3) = 81/(200−81) = 0.68      → TP
//   0.6 image 0 [0,0,10,10]  T1 already taken (duplicate)       → FP
//   0.5 image 0 [20,0,10,8]  IoU(T2) = 80/100 = 0.8            → TP
const images = [
  {
    truth: [[0, 0, 10, 10], [20, 0, 10, 10]] as Box[],
    detections: [
      { box: [0, 0, 10, 10] as Box, score: 0.9 },
      { box: [5, 0, 10, 10] as Box, score: 0.8 },
      { box: [0, 0, 10, 10] as Box, score: 0.6 },
      { box: [20, 0, 10, 8] as Box, score: 0.5 },
    ],
  },
  { truth: [[0, 0, 10, 10]] as Box[], detections: [{ box: [1, 1, 10, 10] as Box, score: 0.7 }] },
];

describe('IoU', () => {
  it('is intersection over union of continuous boxes (hand-computed)', () => {
    expect(intersectionOverUnion([0, 0, 10, 10], [5, 0, 10, 10])).toBeCloseTo(1 / 3, 15); // 50 / 150
    expect(intersectionOverUnion([1, 1, 10, 10], [0, 0, 10, 10])).toBeCloseTo(81 / 119, 15);
    expect(intersectionOverUnion([0, 0, 10, 10], [10, 0, 10, 10])).toBe(0); // touching edges share no area
    expect(intersectionOverUnion([0, 0, 0, 0], [0, 0, 0, 0])).toBe(0); // empty boxes: no division by zero
  });
});

describe('matching, precision/recall and average precision', () => {
  const match = matchDetections(images, 0.5);
  const curve = precisionRecallCurve(match);

  it('matches greedily by score, each truth once (TP, FP, TP, FP, TP)', () => {
    expect(match.detections.map((d) => d.truePositive)).toEqual([true, false, true, false, true]);
    expect(match.truthCount).toBe(3);
  });

  it('gives the hand-computed precision and recall after each detection', () => {
    expect(Array.from(curve.precision)).toEqual([1, 1 / 2, 2 / 3, 2 / 4, 3 / 5]);
    expect(Array.from(curve.recall)).toEqual([1 / 3, 1 / 3, 2 / 3, 2 / 3, 1]);
  });

  it('gives AP = 1/3·1 + 1/3·2/3 + 1/3·3/5 = 34/45 with all-point interpolation (VOC 2010+)', () => {
    expect(averagePrecision(curve)).toBeCloseTo(34 / 45, 12);
  });

  it('reads the detection rate at a false-positive budget off the ranked list', () => {
    expect(detectionRateAtFalsePositives(curve, 0)).toBeCloseTo(1 / 3, 15); // before the first FP
    expect(detectionRateAtFalsePositives(curve, 1)).toBeCloseTo(2 / 3, 15); // up to the 3rd detection
    expect(detectionRateAtFalsePositives(curve, 10)).toBe(1);
  });

  it('AP is 0 when nothing is detected and 1 for a perfect ranking', () => {
    expect(averagePrecision(precisionRecallCurve(matchDetections([{ truth: [[0, 0, 5, 5]], detections: [] }])))).toBe(0);
    const perfect = matchDetections([{ truth: [[0, 0, 5, 5]], detections: [{ box: [0, 0, 5, 5], score: 1 }] }]);
    expect(averagePrecision(precisionRecallCurve(perfect))).toBe(1);
  });
});

describe('miss rate against false positives per image (Dollár et al. 2012)', () => {
  // The first four detections only (drop the 0.5 one), over 2 images:
  // FPPI 0, 0.5, 0.5, 1 and miss rate 2/3, 2/3, 1/3, 1/3; plus the empty point (0, 1).
  const firstFour = [{ ...images[0]!, detections: images[0]!.detections.slice(0, 3) }, images[1]!];
  const curve = missRateCurve(precisionRecallCurve(matchDetections(firstFour, 0.5)), 2);

  it('lists FPPI and miss rate down the ranked list', () => {
    expect(Array.from(curve.falsePositivesPerImage)).toEqual([0, 0, 0.5, 0.5, 1]);
    expect(Array.from(curve.missRate).map((m) => m.toFixed(6))).toEqual(['1.000000', '0.666667', '0.666667', '0.333333', '0.333333']);
  });

  it('log-average miss rate: seven reference points (0.01..0.316) at 2/3, two (0.562, 1) at 1/3', () => {
    const expected = Math.exp((7 * Math.log(2 / 3) + 2 * Math.log(1 / 3)) / 9);
    expect(logAverageMissRate(curve)).toBeCloseTo(expected, 12);
  });
});

describe('ROC', () => {
  it('sweeps thresholds; the area equals the Mann–Whitney statistic 5/6 (hand-counted pairs)', () => {
    // Positives 3, 2, 2; negatives 2, 1. Pairs (p > n) + ½ (p = n): 3>2, 3>1, 2=2, 2>1, 2=2, 2>1 → 5/6.
    const roc = rocCurve([3, 2, 2], [2, 1]);
    expect(Array.from(roc.truePositiveRate)).toEqual([0, 1 / 3, 1, 1]);
    expect(Array.from(roc.falsePositiveRate)).toEqual([0, 0, 0.5, 1]);
    expect(roc.area).toBeCloseTo(5 / 6, 15);
  });
});

describe('detection errors (what evaluate --errors writes)', () => {
  it('lists unmatched detections by score and unmatched truth boxes, as VOC matching decides', () => {
    // Hand-worked: image 0 has truth A = [0,0,10,10] and B = [50,50,10,10]. Detections: a hit on A
    // (score 0.9), a duplicate of A (0.8, counts false), one on nothing (0.95). Image 1 has truth
    // C = [0,0,10,10] and one detection shifted by 6 px (IoU 16/184 < 0.5, false). Misses: B and C.
    const errors = detectionErrors([
      { detections: [{ box: [0, 0, 10, 10], score: 0.9 }, { box: [1, 0, 10, 10], score: 0.8 }, { box: [30, 30, 10, 10], score: 0.95 }], truth: [[0, 0, 10, 10], [50, 50, 10, 10]] },
      { detections: [{ box: [6, 6, 10, 10], score: 0.5 }], truth: [[0, 0, 10, 10]] },
    ], 0.5);
    expect(errors.falseAlarms.map((e) => [e.image, e.index, e.score])).toEqual([[0, 2, 0.95], [0, 1, 0.8], [1, 0, 0.5]]);
    expect(errors.misses.map((e) => [e.image, e.index, e.box])).toEqual([[0, 1, [50, 50, 10, 10]], [1, 0, [0, 0, 10, 10]]]);
  });

  it('reads the best detection rate within a false-positive budget off the ROC points', () => {
    // Scores: positives 3, 2; negatives 2.5, 1. Points (fpr, tpr): (0,0) (0,0.5) (0.5,0.5) (0.5,1) (1,1).
    const roc = rocCurve([3, 2], [2.5, 1]);
    expect(truePositiveRateAt(roc, 0)).toBe(0.5);
    expect(truePositiveRateAt(roc, 0.5)).toBe(1);
  });
});
