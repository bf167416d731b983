/** Receiver operating characteristic over a score: one point per distinct threshold. */
export interface RocCurve {
  /** Thresholds in decreasing order; point i counts samples with score ≥ thresholds[i]. Starts at +Infinity (nothing accepted). */
  readonly thresholds: Float64Array;
  readonly truePositiveRate: Float64Array;
  readonly falsePositiveRate: Float64Array;
  /** Area under the curve by the trapezoid rule, in [0, 1]. */
  readonly area: number;
}

/**
 * ROC of scores on positives against negatives (Fawcett 2006, "An introduction to ROC analysis": threshold sweep):
 * accept a sample when score ≥ threshold; sweep every distinct score. Samples
 * that the cascade rejects can be given −Infinity (never accepted at a finite threshold).
 * With no positives (or negatives) the corresponding rate is 0.
 */
export function rocCurve(positiveScores: ArrayLike<number>, negativeScores: ArrayLike<number>): RocCurve {
  const labelled: Array<[number, boolean]> = [];
  for (let i = 0; i < positiveScores.length; i++) labelled.push([positiveScores[i]!, true]);
  for (let i = 0; i < negativeScores.length; i++) labelled.push([negativeScores[i]!, false]);
  labelled.sort((a, b) => b[0] - a[0]);
  const thresholds = [Infinity];
  const tpr = [0];
  const fpr = [0];
  const positives = positiveScores.length;
  const negatives = negativeScores.length;
  let tp = 0;
  let fp = 0;
  for (let i = 0; i < labelled.length; i++) {
    const [score, positive] = labelled[i]!;
    if (positive) tp++;
    else fp++;
    if (i + 1 < labelled.length && labelled[i + 1]![0] === score) continue;
    thresholds.push(score);
    tpr.push(positives > 0 ? tp / positives : 0);
    fpr.push(negatives > 0 ? fp / negatives : 0);
  }
  let area = 0;
  for (let i = 1; i < tpr.length; i++) area += ((fpr[i]! - fpr[i - 1]!) * (tpr[i]! + tpr[i - 1]!)) / 2;
  return { thresholds: Float64Array.from(thresholds), truePositiveRate: Float64Array.from(tpr), falsePositiveRate: Float64Array.from(fpr), area };
}

/**
 * Detection rate at a false-positive rate of at most `falsePositiveRate`: the highest
 * true-positive rate among the curve's points whose false-positive rate does not exceed it
 * (each point is a threshold one can choose, so this is the best operating point within the
 * budget; 0 when no point fits).
 * @example truePositiveRateAt(rocCurve([3, 2], [1, 2.5]), 0.5) // 1
 */
export function truePositiveRateAt(roc: RocCurve, falsePositiveRate: number): number {
  let best = 0;
  for (let i = 0; i < roc.falsePositiveRate.length; i++) {
    if (roc.falsePositiveRate[i]! <= falsePositiveRate) best = Math.max(best, roc.truePositiveRate[i]!);
  }
  return best;
}
