import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import type { BoosterKind } from '../../src/boost/booster.js';
import { createSplitScratch, searchBestSplit } from '../../src/boost/best-split.js';
import { responseMatrixFromValues, type ResponseMatrix } from '../../src/boost/response-matrix.js';
import { decideTreeRound, growTree, isGrownLeaf, type GrownBranch } from '../../src/boost/tree-round.js';

// The brute-force twin of the tree search: at every node, every feature × every bin edge,
// the criterion summed sample by sample over the node's members (no histograms), the lowest
// error winning, ties to the lowest feature and then the lowest edge. Gentle: the weighted
// squared error Σ w (y − side mean)²; Discrete: the weighted Gini impurity Σ_side 2PN/(P+N).

interface TwinSplit { feature: number; bin: number; below: TwinBranch; above: TwinBranch }
type TwinBranch = TwinSplit | { positive: number; negative: number };

function sideCost(members: number[], matrix: ResponseMatrix, weights: Float64Array, booster: BoosterKind): number {
  let positive = 0;
  let negative = 0;
  for (const s of members) {
    if (s < matrix.positiveCount) positive += weights[s]!;
    else negative += weights[s]!;
  }
  const total = positive + negative;
  if (total === 0) return 0;
  if (booster === 'discrete') return (2 * positive * negative) / total;
  const mean = (positive - negative) / total;
  let cost = 0;
  for (const s of members) cost += weights[s]! * ((s < matrix.positiveCount ? 1 : -1) - mean) ** 2;
  return cost;
}

function twinTree(matrix: ResponseMatrix, weights: Float64Array, booster: BoosterKind, depth: number): TwinBranch {
  const n = matrix.sampleCount;
  const grow = (members: number[], level: number): TwinBranch => {
    const positive = members.filter((s) => s < matrix.positiveCount).reduce((sum, s) => sum + weights[s]!, 0);
    const negative = members.filter((s) => s >= matrix.positiveCount).reduce((sum, s) => sum + weights[s]!, 0);
    const leaf = { positive, negative };
    if (level > depth || positive === 0 || negative === 0) return leaf;
    let best: { error: number; feature: number; bin: number } | null = null;
    for (let f = 0; f < matrix.featureCount; f++) {
      for (let b = 1; b < 256; b++) {
        const below = members.filter((s) => matrix.bins[f * n + s]! < b);
        const above = members.filter((s) => matrix.bins[f * n + s]! >= b);
        if (below.length === 0 || above.length === 0) continue;
        const error = sideCost(below, matrix, weights, booster) + sideCost(above, matrix, weights, booster);
        // A relative tolerance stands for the histogram's different order of additions.
        if (best === null || error < best.error - 1e-12) best = { error, feature: f, bin: b };
      }
    }
    if (best === null) return leaf;
    const { feature, bin } = best;
    return {
      feature, bin,
      below: grow(members.filter((s) => matrix.bins[feature * n + s]! < bin), level + 1),
      above: grow(members.filter((s) => matrix.bins[feature * n + s]! >= bin), level + 1),
    };
  };
  return grow(Array.from({ length: n }, (_, s) => s), 1);
}

/**
 * Same tree on the training samples: at every split the same partition of the node's
 * members (a split on another feature or edge that cuts the node's samples the same way is
 * the same split there — such exact ties occur on small nodes), and the same leaf weights.
 */
function expectSameTree(matrix: ResponseMatrix, actual: GrownBranch, expected: TwinBranch, members: number[], path: string): void {
  if ('positive' in expected) {
    expect(isGrownLeaf(actual), `${path} is a leaf`).toBe(true);
    if (!isGrownLeaf(actual)) return;
    expect(actual.positive, `${path} positive weight`).toBeCloseTo(expected.positive, 12);
    expect(actual.negative, `${path} negative weight`).toBeCloseTo(expected.negative, 12);
    return;
  }
  expect(isGrownLeaf(actual), `${path} is a split`).toBe(false);
  if (isGrownLeaf(actual)) return;
  const n = matrix.sampleCount;
  const below = (feature: number, bin: number): number[] => members.filter((s) => matrix.bins[feature * n + s]! < bin);
  const actualBelow = below(actual.feature, actual.bin);
  const actualAbove = members.filter((s) => !actualBelow.includes(s));
  const expectedBelow = below(expected.feature, expected.bin);
  // (the same cut may come with its sides swapped: another feature ordering the samples the other way)
  const swapped = expectedBelow.length === actualAbove.length && expectedBelow.every((s, i) => s === actualAbove[i]);
  expect(swapped ? actualAbove : actualBelow, `${path}: split ${actual.feature}/${actual.bin} vs the twin's ${expected.feature}/${expected.bin}`).toEqual(expectedBelow);
  expectSameTree(matrix, actual.below, swapped ? expected.above : expected.below, actualBelow, `${path}.below`);
  expectSameTree(matrix, actual.above, swapped ? expected.below : expected.above, actualAbove, `${path}.above`);
}

/** A small random problem: values on a coarse grid (many samples share a bin), random weights summing to 1. */
function randomProblem(seed: string): { matrix: ResponseMatrix; weights: Float64Array } {
  const random = seedrandom(seed);
  const featureCount = 5;
  const sampleCount = 24 + Math.floor(random() * 20);
  const positiveCount = 6 + Math.floor(random() * (sampleCount - 12));
  const levels = 4 + Math.floor(random() * 30);
  const values = Array.from({ length: featureCount * sampleCount }, () => Math.floor(random() * levels));
  const weights = Float64Array.from({ length: sampleCount }, () => 0.1 + random());
  const total = weights.reduce((a, b) => a + b, 0);
  for (let s = 0; s < sampleCount; s++) weights[s]! /= total;
  return { matrix: responseMatrixFromValues(values, featureCount, sampleCount, positiveCount), weights };
}

describe('the tree search equals the brute-force twin', () => {
  for (const booster of ['gentle', 'discrete'] as const) {
    for (const depth of [2, 3]) {
      it(`${booster}, depth ${depth}, on 40 small random problems`, async () => {
        let leavesAboveBottom = 0;
        for (let trial = 0; trial < 40; trial++) {
          const { matrix, weights } = randomProblem(`${booster}-${depth}-${trial}`);
          const scratch = createSplitScratch();
          const grown = await growTree(matrix, weights, new Float64Array(matrix.sampleCount), depth,
            (w) => searchBestSplit(matrix.bins, matrix.sampleCount, matrix.positiveCount, w, booster, 0, matrix.featureCount, scratch, 'tree-node'));
          const twin = twinTree(matrix, weights, booster, depth);
          expectSameTree(matrix, grown, twin, Array.from({ length: matrix.sampleCount }, (_, s) => s), `trial ${trial}`);
          const count = (branch: TwinBranch, level: number): number => ('positive' in branch ? (level <= depth ? 1 : 0) : count(branch.below, level + 1) + count(branch.above, level + 1));
          leavesAboveBottom += count(twin, 1);
        }
        // Some nodes stop early (pure, or no split), so incomplete trees are compared too.
        if (depth === 3) expect(leavesAboveBottom).toBeGreaterThan(0);
      });
    }
  }
});

describe('a tree round', () => {
  it('stops splitting a pure node: a problem one feature separates gives a depth-1 tree', async () => {
    // Feature 0 puts every positive in bins 0..9 and every negative in 10..19.
    const sampleCount = 20;
    const values = [...Array.from({ length: sampleCount }, (_, s) => s), ...Array.from({ length: sampleCount }, (_, s) => (s * 7) % 20)];
    const matrix = responseMatrixFromValues(values, 2, sampleCount, 10);
    const weights = new Float64Array(sampleCount).fill(1 / sampleCount);
    for (const booster of ['gentle', 'discrete'] as const) {
      const grown = await growTree(matrix, weights, new Float64Array(sampleCount), 3,
        (w) => searchBestSplit(matrix.bins, sampleCount, 10, w, booster, 0, 2, createSplitScratch(), 'tree-node'));
      expect(isGrownLeaf(grown)).toBe(false);
      if (isGrownLeaf(grown)) return;
      expect([grown.feature, isGrownLeaf(grown.below), isGrownLeaf(grown.above)]).toEqual([0, true, true]);
      // A perfect tree: error 0, kept, and boosting stops.
      const outcome = decideTreeRound(grown, booster);
      expect(outcome.kind === 'stop' && outcome.reason === 'perfect-separation').toBe(true);
    }
  });

  it('is no better than chance when no feature splits (all constant)', async () => {
    const matrix = responseMatrixFromValues(new Array(2 * 10).fill(3), 2, 10, 5);
    const weights = new Float64Array(10).fill(0.1);
    const grown = await growTree(matrix, weights, new Float64Array(10), 2,
      (w) => searchBestSplit(matrix.bins, 10, 5, w, 'gentle', 0, 2, createSplitScratch(), 'tree-node'));
    expect(decideTreeRound(grown, 'gentle')).toEqual({ kind: 'stop', reason: 'no-better-than-chance' });
  });
});
