import type { PrecisionRecallCurve } from './precision-recall.js';

/** Miss rate against false positives per image (FPPI), one point per operating threshold. */
export interface MissRateCurve {
  /** Starts with the "nothing detected" point (FPPI 0, miss rate 1). */
  readonly falsePositivesPerImage: Float64Array;
  readonly missRate: Float64Array;
}

/** FPPI = FP / images and miss rate = 1 − recall down the ranked list (Dollár et al. 2012). */
export function missRateCurve(curve: PrecisionRecallCurve, imageCount: number): MissRateCurve {
  const n = curve.recall.length;
  const falsePositivesPerImage = new Float64Array(n + 1);
  const missRate = new Float64Array(n + 1);
  missRate[0] = 1;
  for (let i = 0; i < n; i++) {
    falsePositivesPerImage[i + 1] = imageCount > 0 ? curve.falsePositives[i]! / imageCount : 0;
    missRate[i + 1] = curve.truthCount > 0 ? 1 - curve.recall[i]! : 1;
  }
  return { falsePositivesPerImage, missRate };
}

/** The nine FPPI reference points 10^−2, 10^−1.75, …, 10^0 (Dollár et al. 2012; from memory). */
export const LOG_AVERAGE_REFERENCE_POINTS: readonly number[] = Array.from({ length: 9 }, (_, k) => 10 ** (-2 + k / 4));

/**
 * Log-average miss rate (Dollár, Wojek, Schiele & Perona 2012, "Pedestrian
 * detection: an evaluation of the state of the art", evaluation protocol; recalled from memory): the geometric mean
 * of the miss rate sampled at nine FPPI values evenly spaced in log space over
 * [10^−2, 10^0]. At each reference FPPI the sample is the lowest miss rate among
 * operating points whose FPPI does not exceed it (the curve always has the point
 * FPPI 0, miss rate 1). Miss rates are floored at 1e-10 before the logarithm so a
 * perfect detector gives ≈ 0 rather than log 0 (floor value from memory of the
 * authors' toolbox).
 */
export function logAverageMissRate(curve: MissRateCurve): number {
  let logSum = 0;
  for (const reference of LOG_AVERAGE_REFERENCE_POINTS) {
    let miss = 1;
    for (let i = 0; i < curve.missRate.length; i++) {
      if (curve.falsePositivesPerImage[i]! <= reference) miss = Math.min(miss, curve.missRate[i]!);
    }
    logSum += Math.log(Math.max(miss, 1e-10));
  }
  return Math.exp(logSum / LOG_AVERAGE_REFERENCE_POINTS.length);
}
