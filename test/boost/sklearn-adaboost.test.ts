import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { boostRounds } from '../../src/boost/adaboost.js';
import { responseMatrixFromValues } from '../../src/boost/response-matrix.js';

// Fixture made by scripts/make-adaboost-fixture.py with Debian's python3-sklearn
// (AdaBoostClassifier(DecisionTreeClassifier(max_depth=1), algorithm="SAMME")); it records
// the library version, the data (integers 0..255, no ties within a feature, positives first)
// and, per round, sklearn's chosen feature, threshold, weighted error, SAMME weight and
// ensemble training error. The script keeps only data where sklearn's Gini stump is also the
// unique minimum-weighted-error stump in every recorded round, so the comparison is unambiguous.
interface AdaBoostFixture {
  libraryVersion: string;
  positiveCount: number;
  values: number[][];
  labels: number[];
  rounds: Array<{ feature: number; threshold: number; weightedError: number; sammeWeight: number; trainingError: number }>;
}
const fixture = JSON.parse(readFileSync(new URL('../fixtures/sklearn-adaboost-samme.json', import.meta.url), 'utf8')) as AdaBoostFixture;

describe(`Discrete AdaBoost against scikit-learn ${fixture.libraryVersion} SAMME stumps`, () => {
  const featureCount = fixture.values.length;
  const sampleCount = fixture.labels.length;
  const matrix = responseMatrixFromValues(fixture.values.flat(), featureCount, sampleCount, fixture.positiveCount);
  // sklearn starts from uniform weights 1/n, so this comparison does too.
  const { rounds } = boostRounds(matrix, { booster: 'discrete', rounds: fixture.rounds.length, initialWeights: 'uniform' });

  // The code takes the first positiveCount samples as positives; these checks take the
  // classes from the fixture's labels instead, so a mix-up of classes or of the re-weighting
  // rule in the code shows as a mismatch with sklearn.
  const wrongBy = (round: (typeof rounds)[number]): boolean[] => {
    const row = fixture.values[round.stump.feature]!;
    return fixture.labels.map((label, s) => ((row[s]! < round.splitValue ? round.stump.belowOutput : round.stump.aboveOutput) > 0 ? 1 : -1) !== label);
  };

  it('weighs the samples it misclassifies by the labels to sklearn’s weighted error each round', () => {
    rounds.forEach((round, r) => {
      const wrong = wrongBy(round);
      const error = round.weightsBefore.reduce((sum, w, s) => sum + (wrong[s] ? w : 0), 0);
      expect(error).toBeCloseTo(fixture.rounds[r]!.weightedError, 12);
    });
  });

  it('re-weights as SAMME does: a misclassified sample gains the factor e^(SAMME weight), then all are renormalized', () => {
    // SAMME's update w ← w · exp(weight · [misclassified]) followed by normalization (Zhu et al.
    // 2009, Algorithm 2, step 2(d), from memory) gives the same weights as AdaBoost's
    // w · e^(∓α) once renormalized, since weight = 2α for two classes.
    for (let r = 0; r + 1 < rounds.length; r++) {
      const wrong = wrongBy(rounds[r]!);
      const grown = Array.from(rounds[r]!.weightsBefore, (w, s) => w * (wrong[s] ? Math.exp(fixture.rounds[r]!.sammeWeight) : 1));
      const total = grown.reduce((a, b) => a + b, 0);
      const next = rounds[r + 1]!.weightsBefore;
      grown.forEach((w, s) => expect(next[s]! / (w / total)).toBeCloseTo(1, 12));
    }
  });

  it('chooses the same features in the same order', () => {
    expect(rounds.map((round) => round.stump.feature)).toEqual(fixture.rounds.map((round) => round.feature));
  });

  it('has the same weighted error each round, and α equal to half the SAMME weight', () => {
    rounds.forEach((round, r) => {
      expect(round.stump.weightedError).toBeCloseTo(fixture.rounds[r]!.weightedError, 12);
      // SAMME for K = 2 classes: weight = ln((1 − ε)/ε) + ln(K − 1) = 2α (Zhu et al. 2009).
      expect(round.stump.alpha).toBeCloseTo(fixture.rounds[r]!.sammeWeight / 2, 12);
    });
  });

  it('splits every training sample the same way as sklearn’s threshold', () => {
    rounds.forEach((round, r) => {
      const { feature, threshold } = fixture.rounds[r]!;
      for (const value of fixture.values[feature]!) {
        // sklearn sends x ≤ threshold left; our model sends value < splitValue below.
        expect(value < round.splitValue).toBe(value <= threshold);
      }
    });
  });

  it('matches the ensemble training error after each round', () => {
    const scores = new Float64Array(sampleCount);
    rounds.forEach((round, r) => {
      const row = fixture.values[round.stump.feature]!;
      for (let s = 0; s < sampleCount; s++) scores[s]! += row[s]! < round.splitValue ? round.stump.belowOutput : round.stump.aboveOutput;
      let wrong = 0;
      for (let s = 0; s < sampleCount; s++) if ((scores[s]! > 0 ? 1 : -1) !== fixture.labels[s]) wrong++;
      expect(wrong / sampleCount).toBeCloseTo(fixture.rounds[r]!.trainingError, 12);
    });
  });
});
