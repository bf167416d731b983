import { checkThat } from '../check.js';
import type { SplitCandidate } from './best-split.js';

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

/**
 * A Discrete AdaBoost round is no better than chance when its weighted error is at
 * least ½ − CHANCE_MARGIN (α would be below 2·10⁻¹²); a Gentle round when its squared
 * error is within CHANCE_MARGIN of the best constant fit's.
 */
export const CHANCE_MARGIN = 1e-12;

/** A weak classifier's two outputs and its vote weight, as a booster derives them from a split. */
export interface SideOutputs {
  readonly belowOutput: number;
  readonly aboveOutput: number;
  /** Discrete AdaBoost's α; 1 for Gentle AdaBoost, whose outputs are already scaled. */
  readonly alpha: number;
}

/**
 * Everything that differs between the boosters, in one object each: the split scan,
 * the round decision and the outputs of a weak classifier all read these formulas, so a
 * booster's maths has one home. Chosen once per search or round with boosterFormulas;
 * the hot loops never branch on the kind. Weights are assumed to sum to 1.
 * Each booster is its own class, so a thread that runs both sees two object shapes,
 * which V8 handles without falling back to generic calls.
 */
export interface BoosterFormulas {
  readonly kind: BoosterKind;
  /**
   * The error a split minimizes, at each of `count` candidate edges of one feature:
   * errors[k] from the class weights below edge k (positiveBelow[k], negativeBelow[k]) and
   * over all samples. Equal inputs must give equal doubles for any caller: the
   * worker-count independence of training rests on it.
   * One call per feature, the loop over edges inside: a call per edge could not be
   * inlined once a thread has run both boosters, and cost about 10 % of a round.
   */
  splitErrors(
    positiveBelow: Float64Array, negativeBelow: Float64Array, count: number,
    positiveTotal: number, negativeTotal: number, errors: Float64Array,
  ): void;
  /** True when the best split of a round beats no constant classifier; boosting stops there. */
  isNoBetterThanChance(split: SplitCandidate): boolean;
  /** The outputs of the weak classifier that makes this split, and its α. */
  sideOutputs(split: SplitCandidate): SideOutputs;

  // --- Small trees (weak depth 2..3) -------------------------------------------------
  /**
   * The criterion that splits a node of a tree, with splitErrors' contract, over the
   * node's class weights only (weights outside the node are zero).
   */
  nodeSplitErrors(
    positiveBelow: Float64Array, negativeBelow: Float64Array, count: number,
    positiveTotal: number, negativeTotal: number, errors: Float64Array,
  ): void;
  /** A leaf's output before scaling by the tree's α, from the class weights that reach it. */
  leafOutput(positive: number, negative: number): number;
  /** A leaf's share of the tree's error (the round's weighted error is their sum). */
  leafError(positive: number, negative: number): number;
  /** The factor every leaf output is multiplied by, from the tree's error (α; 1 for Gentle). */
  treeScale(treeError: number): number;
  /** True when a tree of this error beats no constant classifier on class weights P, N. */
  isTreeNoBetterThanChance(treeError: number, positive: number, negative: number): boolean;
}

/**
 * Discrete AdaBoost (Freund & Schapire 1997, the AdaBoost algorithm of §4; Viola & Jones
 * 2001 Table 1 for stumps on Haar-like features).
 */
class DiscreteAdaBoost implements BoosterFormulas {
  readonly kind = 'discrete';
  /**
   * Weighted misclassification error ε = Σ w_i [h(x_i) ≠ y_i] of the better polarity:
   * positives above the split misclassify P_below + N_above, positives below misclassify
   * N_below + P_above, at every edge (Freund & Schapire 1997 §4, ε_t; Viola & Jones 2001 Table 1, step 2).
   */
  splitErrors(
    positiveBelow: Float64Array, negativeBelow: Float64Array, count: number,
    positiveTotal: number, negativeTotal: number, errors: Float64Array,
  ): void {
    for (let k = 0; k < count; k++) {
      const positivesAboveError = positiveBelow[k]! + (negativeTotal - negativeBelow[k]!);
      const positivesBelowError = negativeBelow[k]! + (positiveTotal - positiveBelow[k]!);
      errors[k] = positivesAboveError <= positivesBelowError ? positivesAboveError : positivesBelowError;
    }
  }
  /** α = ½ ln((1 − ε)/ε) ≤ 0 once ε ≥ ½: the stump is no better than a coin. */
  isNoBetterThanChance(split: SplitCandidate): boolean {
    return split.error >= 0.5 - CHANCE_MARGIN;
  }
  /**
   * The side holding more positive weight (the polarity splitErrors chose, ties to
   * positives above) votes +α, the other −α, with α = ½ ln((1 − ε)/ε) (see discreteAlpha).
   */
  sideOutputs(split: SplitCandidate): SideOutputs {
    const alpha = discreteAlpha(split.error);
    const positivesAbove = split.belowPositive + split.aboveNegative <= split.belowNegative + split.abovePositive;
    return { belowOutput: positivesAbove ? -alpha : alpha, aboveOutput: positivesAbove ? alpha : -alpha, alpha };
  }
  /**
   * The weighted Gini impurity of the two sides, Σ_side W_side · (1 − p² − n²) with p, n
   * the side's class shares, which is Σ_side 2 P N / (P + N) (Breiman, Friedman, Olshen &
   * Stone 1984, CART §4.3; scikit-learn's DecisionTreeClassifier default criterion). Why not
   * the misclassification error that a stump minimizes: it is flat wherever both children
   * keep the parent's majority, so a first split that makes the sides purer without flipping
   * a vote gains nothing and the tree would stop after one level (Breiman et al. 1984 §4.1
   * discuss this failure); Gini rewards purer sides, and the second level then turns that
   * purity into fewer errors. The tree's ε, and so α, is still its weighted misclassification.
   */
  nodeSplitErrors(
    positiveBelow: Float64Array, negativeBelow: Float64Array, count: number,
    positiveTotal: number, negativeTotal: number, errors: Float64Array,
  ): void {
    for (let k = 0; k < count; k++) {
      const positiveAbove = positiveTotal - positiveBelow[k]!;
      const negativeAbove = negativeTotal - negativeBelow[k]!;
      const below = positiveBelow[k]! + negativeBelow[k]!;
      const above = positiveAbove + negativeAbove;
      errors[k] = (below > 0 ? (2 * positiveBelow[k]! * negativeBelow[k]!) / below : 0)
        + (above > 0 ? (2 * positiveAbove * negativeAbove) / above : 0);
    }
  }
  /** The leaf votes for its heavier class (+1 on a tie, as a stump's polarity ties to positives). */
  leafOutput(positive: number, negative: number): number {
    return positive >= negative ? 1 : -1;
  }
  /** The weight the leaf's vote gets wrong: min(P, N). */
  leafError(positive: number, negative: number): number {
    return positive >= negative ? negative : positive;
  }
  /** α = ½ ln((1 − ε)/ε) of the whole tree's weighted misclassification ε (Freund & Schapire 1997 §4). */
  treeScale(treeError: number): number {
    return discreteAlpha(treeError);
  }
  isTreeNoBetterThanChance(treeError: number): boolean {
    return treeError >= 0.5 - CHANCE_MARGIN;
  }
}

/** Gentle AdaBoost (Friedman, Hastie & Tibshirani 2000, Algorithm 4). */
class GentleAdaBoost implements BoosterFormulas {
  readonly kind = 'gentle';
  /**
   * Weighted squared error Σ w_i (y_i − c_side)² of the least-squares stump, step 2(a) of
   * Algorithm 4: with c_side the side's weighted label mean (P − N)/(P + N) and y² = 1,
   * each side contributes (P + N) − (P − N)²/(P + N), so the error is
   * W − Σ_side (P − N)²/(P + N) with W = P_total + N_total; an empty side contributes 0.
   */
  splitErrors(
    positiveBelow: Float64Array, negativeBelow: Float64Array, count: number,
    positiveTotal: number, negativeTotal: number, errors: Float64Array,
  ): void {
    const total = positiveTotal + negativeTotal;
    for (let k = 0; k < count; k++) {
      const positiveAbove = positiveTotal - positiveBelow[k]!;
      const negativeAbove = negativeTotal - negativeBelow[k]!;
      const below = positiveBelow[k]! + negativeBelow[k]!;
      const above = positiveAbove + negativeAbove;
      const differenceBelow = positiveBelow[k]! - negativeBelow[k]!;
      const differenceAbove = positiveAbove - negativeAbove;
      errors[k] = total
        - (below > 0 ? (differenceBelow * differenceBelow) / below : 0)
        - (above > 0 ? (differenceAbove * differenceAbove) / above : 0);
    }
  }
  /** The best constant fit, c = (P − N)/(P + N) everywhere, leaves W − (P − N)²/W. */
  isNoBetterThanChance(split: SplitCandidate): boolean {
    const positive = split.belowPositive + split.abovePositive;
    const negative = split.belowNegative + split.aboveNegative;
    const constantError = positive + negative - ((positive - negative) * (positive - negative)) / (positive + negative);
    return split.error >= constantError - CHANCE_MARGIN;
  }
  /**
   * Each side outputs its weighted label mean (P − N)/(P + N), the least-squares fit of
   * step 2(a); an empty side outputs 0. Step 2(b) adds f_m unscaled, so α = 1.
   */
  sideOutputs(split: SplitCandidate): SideOutputs {
    const below = split.belowPositive + split.belowNegative;
    const above = split.abovePositive + split.aboveNegative;
    return {
      belowOutput: below > 0 ? (split.belowPositive - split.belowNegative) / below : 0,
      aboveOutput: above > 0 ? (split.abovePositive - split.aboveNegative) / above : 0,
      alpha: 1,
    };
  }
  /**
   * The same squared error as splitErrors, over the node: the weighted least-squares
   * regression tree on ±1 targets grows each node by the stump rule (Friedman et al. 2000
   * §4 fit f_m by weighted least squares; with trees the fit is a CART regression tree,
   * Breiman et al. 1984 §8.3).
   */
  nodeSplitErrors(
    positiveBelow: Float64Array, negativeBelow: Float64Array, count: number,
    positiveTotal: number, negativeTotal: number, errors: Float64Array,
  ): void {
    this.splitErrors(positiveBelow, negativeBelow, count, positiveTotal, negativeTotal, errors);
  }
  /** The leaf's weighted label mean (P − N)/(P + N); 0 for a leaf no weight reaches. */
  leafOutput(positive: number, negative: number): number {
    const total = positive + negative;
    return total > 0 ? (positive - negative) / total : 0;
  }
  /** The leaf's weighted squared error (P + N) − (P − N)²/(P + N); 0 when empty. */
  leafError(positive: number, negative: number): number {
    const total = positive + negative;
    return total > 0 ? total - ((positive - negative) * (positive - negative)) / total : 0;
  }
  /** Leaf means are added unscaled (Algorithm 4, step 2(b)). */
  treeScale(): number {
    return 1;
  }
  /** As for a stump: the tree must beat the best constant fit, W − (P − N)²/W. */
  isTreeNoBetterThanChance(treeError: number, positive: number, negative: number): boolean {
    const constantError = positive + negative - ((positive - negative) * (positive - negative)) / (positive + negative);
    return treeError >= constantError - CHANCE_MARGIN;
  }
}

/** Discrete AdaBoost's formulas. */
export const DISCRETE_ADABOOST: BoosterFormulas = new DiscreteAdaBoost();
/** Gentle AdaBoost's formulas. */
export const GENTLE_ADABOOST: BoosterFormulas = new GentleAdaBoost();

/** The formulas of booster `kind`. */
export function boosterFormulas(kind: BoosterKind): BoosterFormulas {
  return kind === 'gentle' ? GENTLE_ADABOOST : DISCRETE_ADABOOST;
}
