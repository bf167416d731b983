import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { updateWeights, type BoosterKind } from '../../src/boost/booster.js';
import { createSplitScratch, searchBestSplit } from '../../src/boost/best-split.js';
import { responseMatrixFromValues } from '../../src/boost/response-matrix.js';
import { decideTreeRound, growTree, treeOutputs, type MatrixBranch } from '../../src/boost/tree-round.js';

// Fixture made by scripts/make-tree-fixture.py with Debian's python3-sklearn: two boosting
// rounds of DecisionTreeRegressor(max_depth=2) on ±1 targets (Gentle AdaBoost's weak
// learner) and of DecisionTreeClassifier(max_depth=2, Gini) (Discrete AdaBoost's), both with
// sample_weight, on integer features 0..255 without ties (8-bit binning is then exact). It
// records the library versions, each round's weights, the root feature, every sample's leaf
// and prediction, and the tree's weighted error and α. The script keeps only data where every
// split sklearn made is the unique best of its node by brute force, so the comparison is unambiguous.
interface TreeRound {
  weights: number[];
  rootFeature: number;
  leaves: number[];
  predictions: number[];
  weightedError: number;
  alpha: number;
}
interface TreeFixture {
  libraryVersion: string;
  numpyVersion: string;
  positiveCount: number;
  values: number[][];
  labels: number[];
  gentle: TreeRound[];
  discrete: TreeRound[];
}
const fixture = JSON.parse(readFileSync(new URL('../fixtures/sklearn-trees.json', import.meta.url), 'utf8')) as TreeFixture;

/** Each sample's path through a matrix tree, e.g. "BA" (below, then above). */
function paths(root: MatrixBranch, bins: Uint8Array, sampleCount: number): string[] {
  return Array.from({ length: sampleCount }, (_, s) => {
    let path = '';
    let branch = root;
    while ('feature' in branch) {
      const below = bins[branch.feature * sampleCount + s]! < branch.bin;
      path += below ? 'B' : 'A';
      branch = below ? branch.below : branch.above;
    }
    return path;
  });
}

/** A partition of the samples as sorted lists of members, by any labelling of the parts. */
function partition(labels: ReadonlyArray<string | number>): number[][] {
  const parts = new Map<string | number, number[]>();
  labels.forEach((label, s) => parts.set(label, [...(parts.get(label) ?? []), s]));
  return [...parts.values()].sort((a, b) => a[0]! - b[0]!);
}

describe(`depth-2 trees against scikit-learn ${fixture.libraryVersion} (numpy ${fixture.numpyVersion})`, () => {
  const featureCount = fixture.values.length;
  const sampleCount = fixture.labels.length;
  const matrix = responseMatrixFromValues(fixture.values.flat(), featureCount, sampleCount, fixture.positiveCount);
  const scratch = createSplitScratch();

  const cases: Array<[BoosterKind, string, TreeRound[]]> = [
    ['gentle', 'DecisionTreeRegressor on ±1 targets', fixture.gentle],
    ['discrete', 'DecisionTreeClassifier (Gini)', fixture.discrete],
  ];
  for (const [booster, name, rounds] of cases) {
    it(`${booster}: the first two rounds' trees match ${name}: root feature, partition of the samples, leaf outputs, error and α`, async () => {
      // Round 1 starts from the fixture's (random) weights; round 2 from ours after round 1,
      // which must equal sklearn's re-weighting for the second trees to match.
      let weights: Float64Array = Float64Array.from(rounds[0]!.weights);
      for (const [r, round] of rounds.entries()) {
        rounds[r]!.weights.forEach((w, s) => expect(weights[s]!, `round ${r + 1} weight ${s}`).toBeCloseTo(w, 14));
        const grown = await growTree(matrix, weights, new Float64Array(sampleCount), 2, (w) => searchBestSplit(matrix.bins, sampleCount, fixture.positiveCount, w, booster, 0, featureCount, scratch, 'tree-node'));
        const outcome = decideTreeRound(grown, booster);
        expect(outcome.kind).toBe('round');
        if (outcome.kind !== 'round') return;
        const { tree } = outcome;
        expect(tree.root.feature, `round ${r + 1} root feature`).toBe(round.rootFeature);
        expect(partition(paths(tree.root, matrix.bins, sampleCount)), `round ${r + 1} leaves`).toEqual(partition(round.leaves));
        const outputs = treeOutputs(matrix, tree.root);
        // Gentle: the leaf's weighted label mean is the regressor's prediction. Discrete: the
        // leaf votes sklearn's class, scaled by α.
        outputs.forEach((output, s) => {
          const expected = booster === 'gentle' ? round.predictions[s]! : round.alpha * round.predictions[s]!;
          expect(output, `round ${r + 1} sample ${s}`).toBeCloseTo(expected, 12);
        });
        expect(tree.weightedError).toBeCloseTo(round.weightedError, 12);
        expect(tree.alpha).toBeCloseTo(round.alpha, 12);
        weights = updateWeights(weights, outputs, fixture.positiveCount);
      }
    });
  }

  it('labels agree with the positives-first order the code assumes', () => {
    expect(fixture.labels.slice(0, fixture.positiveCount).every((y) => y === 1)).toBe(true);
    expect(fixture.labels.slice(fixture.positiveCount).every((y) => y === -1)).toBe(true);
  });
});
