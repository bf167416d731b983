import type { MatchResult } from './match-detections.js';

/**
 * Precision/recall after each detection in score order: point i counts the
 * first i + 1 detections. Recall is 0 when there is no truth.
 */
export interface PrecisionRecallCurve {
  readonly scores: Float64Array;
  readonly truePositives: Float64Array;
  readonly falsePositives: Float64Array;
  readonly precision: Float64Array;
  readonly recall: Float64Array;
  readonly truthCount: number;
}

/** Cumulative counts, precision TP/(TP+FP) and recall TP/truth down the ranked list. */
export function precisionRecallCurve(match: MatchResult): PrecisionRecallCurve {
  const n = match.detections.length;
  const scores = new Float64Array(n);
  const truePositives = new Float64Array(n);
  const falsePositives = new Float64Array(n);
  const precision = new Float64Array(n);
  const recall = new Float64Array(n);
  let tp = 0;
  let fp = 0;
  match.detections.forEach((detection, i) => {
    if (detection.truePositive) tp++;
    else fp++;
    scores[i] = detection.score;
    truePositives[i] = tp;
    falsePositives[i] = fp;
    precision[i] = tp / (tp + fp);
    recall[i] = match.truthCount > 0 ? tp / match.truthCount : 0;
  });
  return { scores, truePositives, falsePositives, precision, recall, truthCount: match.truthCount };
}

/**
 * Average precision with all-point interpolation, the PASCAL VOC definition
 * from 2010 on (Everingham et al. 2010, detection task; VOC devkit `VOCap`): precision is
 * made monotone (p_interp(r) = max over r' ≥ r of p(r')) and AP is the area
 * under that step curve, Σ (r_{i+1} − r_i) · p_interp(r_{i+1}). In [0, 1]; 0 with no truth.
 * @example one true positive out of two truths, ranked first: AP = 0.5
 */
export function averagePrecision(curve: PrecisionRecallCurve): number {
  const n = curve.recall.length;
  if (curve.truthCount === 0 || n === 0) return 0;
  const recall = [0, ...curve.recall, 1];
  const precision = [0, ...curve.precision, 0];
  for (let i = precision.length - 2; i >= 0; i--) precision[i] = Math.max(precision[i]!, precision[i + 1]!);
  let area = 0;
  for (let i = 1; i < recall.length; i++) {
    if (recall[i] !== recall[i - 1]) area += (recall[i]! - recall[i - 1]!) * precision[i]!;
  }
  return area;
}

/**
 * Detection rate (recall) reached while the total number of false positives is
 * at most `falsePositives`, taking the best operating point (score threshold).
 * @example detectionRateAtFalsePositives(curve, 10)
 */
export function detectionRateAtFalsePositives(curve: PrecisionRecallCurve, falsePositives: number): number {
  let best = 0;
  for (let i = 0; i < curve.recall.length; i++) {
    if (curve.falsePositives[i]! <= falsePositives) best = Math.max(best, curve.recall[i]!);
  }
  return best;
}
