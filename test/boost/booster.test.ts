import { describe, expect, it } from 'vitest';
import { discreteAlpha, initialWeights, updateWeights } from '../../src/boost/booster.js';

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
