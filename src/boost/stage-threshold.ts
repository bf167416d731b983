import { checkNumber } from '../check.js';

/**
 * The stage threshold that keeps a detection rate: the score reached by
 * ⌈d · n⌉ of the n validation positives (Viola & Jones 2001 §4: the boosted
 * classifier's threshold is lowered until the detection rate is met). Since a window
 * passes when score ≥ threshold, at least that many positives pass; ties at the
 * threshold may let more through.
 * `scores` is not changed. d·n is rounded up after a 1e-9 allowance, so
 * d = 0.995, n = 200 asks for 199 positives, not 200 from floating-point noise.
 * @throws RectboostError `invalid-option` for d outside (0, 1] or an empty score list.
 * @example thresholdForDetectionRate([3, 1, 2, 0], 0.5) // 2: two of four reach it
 */
export function thresholdForDetectionRate(scores: ArrayLike<number>, detectionRate: number): number {
  checkNumber('detection rate', detectionRate, Number.MIN_VALUE, 1);
  checkNumber('number of validation scores', scores.length, 1, Number.MAX_SAFE_INTEGER);
  const sorted = Float64Array.from(scores).sort().reverse();
  const needed = Math.max(1, Math.ceil(detectionRate * sorted.length - 1e-9));
  return sorted[needed - 1]!;
}

/** Share of `scores` at or above `threshold` (a pass rate: detection or false-positive rate). */
export function passRate(scores: ArrayLike<number>, threshold: number): number {
  if (scores.length === 0) return 0;
  let passed = 0;
  for (let i = 0; i < scores.length; i++) if (scores[i]! >= threshold) passed++;
  return passed / scores.length;
}
