import { describe, expect, it } from 'vitest';
import type { SplitCandidate } from '../../src/boost/best-split.js';
import { boosterFormulas, discreteAlpha, type BoosterFormulas, DISCRETE_ADABOOST, GENTLE_ADABOOST, initialWeights, updateWeights } from '../../src/boost/booster.js';

describe('Discrete AdaBoost formulas (Freund & Schapire 1997)', () => {
  it('gives α = ½ ln((1 − ε)/ε): ε = 0.25 → ½ ln 3', () => {
    // Hand computation: (1 − 0.25)/0.25 = 3, so α = ½ ln 3 = 0.5493061443340549.
    expect(discreteAlpha(0.25)).toBeCloseTo(0.5493061443340549, 15);
    // ε = 0.1: α = ½ ln 9 = ln 3.
    expect(discreteAlpha(0.1)).toBeCloseTo(Math.log(3), 15);
  });

  it('refuses a learner no better than chance', () => {
    expect(() => discreteAlpha(0.5)).toThrow(/\[0, 0.5\)/);
  });

  it('re-weights a hand-computed example by e^{∓α} and renormalizes', () => {
    // Four samples of weight ¼; samples 0, 1 positive, 2, 3 negative. The stump votes
    // +α on 0, 1, 2 and −α on 3, so only sample 2 is wrong: ε = ¼, α = ½ ln 3.
    // Correct: ¼ e^{−α} = ¼/√3; wrong: ¼ √3. Sum = ¾/√3 + ¼√3 = 1.5/√3.
    // Normalized: correct (¼/√3)/(1.5/√3) = 1/6, wrong ¼√3·√3/1.5 = ½.
    // (Freund & Schapire's update leaves the last learner with error exactly ½.)
    const alpha = discreteAlpha(0.25);
    const weights = [0.25, 0.25, 0.25, 0.25];
    const updated = updateWeights(weights, [alpha, alpha, alpha, -alpha], 2);
    expect(Array.from(updated).map((w) => Number(w.toFixed(15)))).toEqual([1 / 6, 1 / 6, 0.5, 1 / 6].map((w) => Number(w.toFixed(15))));
    expect(weights).toEqual([0.25, 0.25, 0.25, 0.25]); // caller's array untouched
  });

  it('starts with half the weight on each class (Viola & Jones 2001 Table 1), or uniform on request', () => {
    const balanced = initialWeights(2, 6);
    // 1/(2m) = 1/4 per positive, 1/(2l) = 1/12 per negative.
    expect(Array.from(balanced)).toEqual([0.25, 0.25, 1 / 12, 1 / 12, 1 / 12, 1 / 12, 1 / 12, 1 / 12]);
    expect(Array.from(initialWeights(2, 6, 'uniform'))).toEqual(new Array(8).fill(1 / 8));
  });

  it('keeps weights summing to 1 after any update (invariant)', () => {
    const outputs = [0.3, -1.2, 2.5, -0.1, 0.7];
    const updated = updateWeights(initialWeights(2, 3), outputs, 2);
    expect(updated.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 14);
  });
});

/**
 * A split of hand-picked samples: `below[i]` says whether sample i falls below it; the
 * first `positives` samples are positive (y = +1), the rest negative (y = −1).
 */
function splitOf(weights: number[], positives: number, below: boolean[], error: number): SplitCandidate {
  let belowPositive = 0, belowNegative = 0, abovePositive = 0, aboveNegative = 0;
  weights.forEach((w, i) => {
    if (below[i]) { if (i < positives) belowPositive += w; else belowNegative += w; } else if (i < positives) abovePositive += w; else aboveNegative += w;
  });
  return { feature: 0, bin: 1, error, belowPositive, belowNegative, abovePositive, aboveNegative };
}

/** A booster's split error at one edge. */
function errorAt(formulas: BoosterFormulas, positiveBelow: number, negativeBelow: number, positiveTotal: number, negativeTotal: number): number {
  const errors = new Float64Array(1);
  formulas.splitErrors(Float64Array.of(positiveBelow), Float64Array.of(negativeBelow), 1, positiveTotal, negativeTotal, errors);
  return errors[0]!;
}

describe('the booster objects: one home for each booster’s split error, side outputs and α', () => {
  // Six samples, 0..2 positive; samples 0, 1 and 3 fall below the split.
  const weights = [0.1, 0.25, 0.05, 0.2, 0.15, 0.25];
  const below = [true, true, false, true, false, false];
  const labels = [1, 1, 1, -1, -1, -1];
  const sums = splitOf(weights, 3, below, 0);
  const splitError = (formulas: typeof DISCRETE_ADABOOST) =>
    errorAt(formulas, sums.belowPositive, sums.belowNegative, sums.belowPositive + sums.abovePositive, sums.belowNegative + sums.aboveNegative);

  it('scores a discrete split by the weighted error of its better polarity, summed sample by sample (Freund & Schapire 1997)', () => {
    // Brute-force twin: each polarity's misclassified weight, sample by sample.
    const wrongIfPositivesAbove = weights.reduce((e, w, i) => e + ((below[i] ? 1 : -1) === labels[i] ? w : 0), 0);
    const wrongIfPositivesBelow = weights.reduce((e, w, i) => e + ((below[i] ? 1 : -1) !== labels[i] ? w : 0), 0);
    expect(splitError(DISCRETE_ADABOOST)).toBeCloseTo(Math.min(wrongIfPositivesAbove, wrongIfPositivesBelow), 15);
  });

  it('scores a gentle split by Σ w (y − c_side)², c_side the side’s weighted label mean (Friedman et al. 2000, Alg. 4, step 2a)', () => {
    const mean = (side: boolean) => {
      const members = weights.map((w, i) => ({ w, y: labels[i]!, side: below[i] === side })).filter((m) => m.side);
      return members.reduce((a, m) => a + m.w * m.y, 0) / members.reduce((a, m) => a + m.w, 0);
    };
    const squared = weights.reduce((e, w, i) => e + w * (labels[i]! - mean(below[i]!)) ** 2, 0);
    expect(splitError(GENTLE_ADABOOST)).toBeCloseTo(squared, 15);
    // And its outputs are those means, with α = 1 (step 2b adds f_m unscaled).
    const outputs = GENTLE_ADABOOST.sideOutputs({ ...sums, error: squared });
    expect(outputs.belowOutput).toBeCloseTo(mean(true), 15);
    expect(outputs.aboveOutput).toBeCloseTo(mean(false), 15);
    expect(outputs.alpha).toBe(1);
  });

  it('gives a discrete stump ±α, +α on the side with more positive weight', () => {
    // Below: P 0.35, N 0.2; above: P 0.05, N 0.4. Positives below misclassify 0.2 + 0.05 = 0.25.
    const outputs = DISCRETE_ADABOOST.sideOutputs({ ...sums, error: 0.25 });
    expect(outputs.alpha).toBe(discreteAlpha(0.25));
    expect(outputs.belowOutput).toBe(outputs.alpha);
    expect(outputs.aboveOutput).toBe(-outputs.alpha);
    // The mirrored split flips the votes.
    const mirrored = splitOf(weights, 3, below.map((b) => !b), 0.25);
    expect(DISCRETE_ADABOOST.sideOutputs(mirrored).belowOutput).toBe(-outputs.alpha);
  });

  it('calls a discrete round no better than chance from ε = ½ (where α reaches 0), not below', () => {
    expect(DISCRETE_ADABOOST.isNoBetterThanChance({ ...sums, error: 0.5 })).toBe(true);
    expect(DISCRETE_ADABOOST.isNoBetterThanChance({ ...sums, error: 0.49 })).toBe(false);
  });

  it('calls a gentle round no better than chance when both sides have the same label mean (the constant fit)', () => {
    // Below: P 0.2, N 0.1; above: P 0.4, N 0.2 → both means 1/3, so the split explains nothing.
    const flat = { feature: 0, bin: 1, belowPositive: 0.2, belowNegative: 0.1, abovePositive: 0.4, aboveNegative: 0.2 };
    const flatError = errorAt(GENTLE_ADABOOST, 0.2, 0.1, 0.6, 0.3);
    expect(GENTLE_ADABOOST.isNoBetterThanChance({ ...flat, error: flatError })).toBe(true);
    expect(GENTLE_ADABOOST.isNoBetterThanChance({ ...sums, error: splitError(GENTLE_ADABOOST) })).toBe(false);
  });

  it('scores every edge it is given, and only those', () => {
    // Three edges in one call equal three one-edge calls; the slot past `count` is left alone.
    const positiveBelow = Float64Array.of(0.1, 0.3, 0.4), negativeBelow = Float64Array.of(0.05, 0.2, 0.5);
    for (const formulas of [DISCRETE_ADABOOST, GENTLE_ADABOOST]) {
      const errors = new Float64Array(4).fill(-1);
      formulas.splitErrors(positiveBelow, negativeBelow, 3, 0.4, 0.6, errors);
      expect(Array.from(errors)).toEqual([0, 1, 2].map((k) => errorAt(formulas, positiveBelow[k]!, negativeBelow[k]!, 0.4, 0.6)).concat(-1));
    }
  });

  it('is chosen by kind', () => {
    expect(boosterFormulas('discrete')).toBe(DISCRETE_ADABOOST);
    expect(boosterFormulas('gentle')).toBe(GENTLE_ADABOOST);
  });
});
