import { checkThat } from '../check.js';

/**
 * Which AdaBoost variant turns a chosen split into weak-classifier outputs.
 *
 * - `discrete`: Discrete AdaBoost (Freund & Schapire 1997; Viola & Jones 2001 Table 1).
 *   The stump votes ±1 and is weighted by α = ½ ln((1 − ε)/ε), so its outputs are ±α.
 * - `gentle`: Gentle AdaBoost (Friedman, Hastie & Tibshirani 2000, Algorithm 4). Each
 *   side outputs the weighted mean of the labels y ∈ {−1, +1} that fall on it, which is
 *   the weighted least-squares fit of a stump; no α.
 */
export type BoosterKind = 'discrete' | 'gentle';

/** The boosters rectboost offers, in the order the CLI lists them. */
export const BOOSTER_KINDS: readonly BoosterKind[] = ['discrete', 'gentle'];

/**
 * The weighted error below which a Discrete AdaBoost round counts as perfect.
 * α = ½ ln((1 − ε)/ε) is infinite at ε = 0; a round this good stops boosting
 * (nothing is left to re-weight) and its α is taken at this floor, ½ ln(10^12) ≈ 13.8,
 * large enough to dominate any later sum yet finite for JSON.
 */
export const PERFECT_ERROR = 1e-12;

/**
 * Discrete AdaBoost's vote weight α = ½ ln((1 − ε)/ε) for a weak classifier of
 * weighted error ε (Freund & Schapire 1997, §4, with β = ε/(1 − ε) and α = ½ ln(1/β);
 * Schapire & Singer 1999 write the same α for ±1 votes). ε is clamped below at PERFECT_ERROR.
 * @throws RectboostError `invalid-option` unless 0 ≤ ε < 0.5 (a weaker learner has α ≤ 0).
 * @example discreteAlpha(0.25) // ½ ln 3 ≈ 0.5493
 */
export function discreteAlpha(weightedError: number): number {
  checkThat(
    Number.isFinite(weightedError) && weightedError >= 0 && weightedError < 0.5,
    `A Discrete AdaBoost round needs a weighted error in [0, 0.5); received ${weightedError}.`,
  );
  const error = Math.max(weightedError, PERFECT_ERROR);
  return 0.5 * Math.log((1 - error) / error);
}

/**
 * Initial sample weights, summing to 1, for `positiveCount` positives stored
 * first and then `negativeCount` negatives.
 * - `balanced` (default): half the mass on each class, 1/(2m) per positive and
 *   1/(2l) per negative (Viola & Jones 2001, Table 1), so a rare class still counts.
 * - `uniform`: 1/n each, as scikit-learn's AdaBoostClassifier starts.
 * @throws RectboostError `invalid-option` when either count is below 1.
 */
export function initialWeights(positiveCount: number, negativeCount: number, scheme: 'balanced' | 'uniform' = 'balanced'): Float64Array {
  checkThat(
    Number.isInteger(positiveCount) && Number.isInteger(negativeCount) && positiveCount >= 1 && negativeCount >= 1,
    `Boosting needs at least one positive and one negative sample; received ${positiveCount} positives and ${negativeCount} negatives.`,
  );
  const count = positiveCount + negativeCount;
  const weights = new Float64Array(count);
  const positiveWeight = scheme === 'balanced' ? 0.5 / positiveCount : 1 / count;
  const negativeWeight = scheme === 'balanced' ? 0.5 / negativeCount : 1 / count;
  weights.fill(positiveWeight, 0, positiveCount);
  weights.fill(negativeWeight, positiveCount);
  return weights;
}

/**
 * The AdaBoost re-weighting w_i ← w_i · exp(−y_i · h_i), renormalized to sum 1,
 * where h_i is the weak classifier's output on sample i (±α for Discrete AdaBoost,
 * so correct samples shrink by e^{−α} and wrong ones grow by e^{α}, Freund &
 * Schapire 1997; the side mean for Gentle AdaBoost, Friedman et al. 2000 Alg. 4)
 * and y_i = +1 for the first `positiveCount` samples, −1 for the rest.
 * Returns a new array; `weights` and `outputs` are not changed.
 * @example updateWeights([0.25, 0.25, 0.25, 0.25], [a, a, -a, a], 2) with a = ½ ln 3
 *   → [1/6, 1/6, 1/2, 1/6] (sample 2 is a negative that got a positive vote).
 */
export function updateWeights(weights: ArrayLike<number>, outputs: ArrayLike<number>, positiveCount: number): Float64Array {
  const count = weights.length;
  const updated = new Float64Array(count);
  let total = 0;
  for (let i = 0; i < positiveCount; i++) {
    const value = weights[i]! * Math.exp(-outputs[i]!);
    updated[i] = value;
    total += value;
  }
  for (let i = positiveCount; i < count; i++) {
    const value = weights[i]! * Math.exp(outputs[i]!);
    updated[i] = value;
    total += value;
  }
  const scale = 1 / total;
  for (let i = 0; i < count; i++) updated[i]! *= scale;
  return updated;
}
