import { boosterFormulas, PERFECT_ERROR, type BoosterKind } from './booster.js';
import type { SplitCandidate } from './best-split.js';
import type { ResponseMatrix } from './response-matrix.js';

/**
 * A tree in matrix terms: samples whose bin in row `feature` is < `bin` go `below`.
 * One shape serves both stages of a round; only the leaves differ.
 */
export interface MatrixTreeSplit<Leaf> {
  readonly feature: number;
  readonly bin: number;
  readonly below: MatrixTreeSplit<Leaf> | Leaf;
  readonly above: MatrixTreeSplit<Leaf> | Leaf;
}

/** A grown leaf keeps the class weights that reach it, before the booster turns them into an output. */
export interface GrownLeaf {
  readonly positive: number;
  readonly negative: number;
}
export type GrownSplit = MatrixTreeSplit<GrownLeaf>;
export type GrownBranch = GrownSplit | GrownLeaf;

/** A leaf with its output: the weak classifier a tree round chose. */
export interface MatrixLeaf {
  readonly output: number;
}
export type MatrixSplit = MatrixTreeSplit<MatrixLeaf>;
export type MatrixBranch = MatrixSplit | MatrixLeaf;

/** What a tree round chose: the tree (its root a split), its weighted error and α (1 for Gentle). */
export interface ChosenTree {
  readonly root: MatrixSplit;
  readonly weightedError: number;
  readonly alpha: number;
}

/** A tree round's decision, as decideRound's for stumps. */
export type TreeRoundOutcome =
  | { readonly kind: 'round'; readonly tree: ChosenTree }
  | { readonly kind: 'stop'; readonly reason: 'perfect-separation'; readonly tree: ChosenTree }
  | { readonly kind: 'stop'; readonly reason: 'no-better-than-chance' };

/**
 * The best split of all features under `weights` with the booster's nodeSplitErrors
 * (searchBestSplit with rule `tree-node`, in this thread or in a pool).
 */
export type NodeSplitSearch = (weights: Float64Array) => SplitCandidate | null | Promise<SplitCandidate | null>;

/** True for a leaf of a grown or output tree. */
export function isGrownLeaf(branch: GrownBranch): branch is GrownLeaf {
  return 'positive' in branch;
}
function isMatrixLeaf(branch: MatrixBranch): branch is MatrixLeaf {
  return 'output' in branch;
}

/**
 * Grows a tree of at most `depth` levels of splits (1..3) on a response matrix, top-down
 * (CART, Breiman et al. 1984 ch. 2–3): the root is the best split over all samples; each
 * child node is searched over all features again with the same histogram kernel, its
 * weights copied into `nodeWeights` and every sample outside the node set to weight 0, so
 * that its histograms hold exactly the node's samples. A node becomes a leaf when it is at
 * the depth limit, pure (one class holds all its weight) or has no split (all its weight in
 * one bin of every feature); trees may therefore be incomplete.
 *
 * Cost: one full search per split, so up to 2^depth − 1 searches per round (the zeroed
 * weights still pass through the histogram loop).
 * Determinism: the searches are the worker-count-independent searchBestSplit; node
 * membership comes from matrix bins only.
 * IN: `weights` (sum 1, not changed). OUT: `nodeWeights` (scratch, overwritten).
 */
export async function growTree(
  matrix: Pick<ResponseMatrix, 'bins' | 'sampleCount' | 'positiveCount'>,
  weights: Float64Array,
  nodeWeights: Float64Array,
  depth: number,
  search: NodeSplitSearch,
): Promise<GrownBranch> {
  const n = matrix.sampleCount;
  let positive = 0;
  let negative = 0;
  for (let s = 0; s < matrix.positiveCount; s++) positive += weights[s]!;
  for (let s = matrix.positiveCount; s < n; s++) negative += weights[s]!;
  const grow = async (members: Int32Array | null, level: number, nodePositive: number, nodeNegative: number): Promise<GrownBranch> => {
    const leaf: GrownLeaf = { positive: nodePositive, negative: nodeNegative };
    if (level > depth || nodePositive === 0 || nodeNegative === 0) return leaf;
    let candidate: SplitCandidate | null;
    if (members === null) {
      candidate = await search(weights);
    } else {
      nodeWeights.fill(0);
      for (let i = 0; i < members.length; i++) nodeWeights[members[i]!] = weights[members[i]!]!;
      candidate = await search(nodeWeights);
    }
    if (candidate === null) return leaf;
    const row = candidate.feature * n;
    const below: number[] = [];
    const above: number[] = [];
    const visit = (s: number): void => {
      (matrix.bins[row + s]! < candidate.bin ? below : above).push(s);
    };
    if (members === null) for (let s = 0; s < n; s++) visit(s);
    else for (let i = 0; i < members.length; i++) visit(members[i]!);
    return {
      feature: candidate.feature,
      bin: candidate.bin,
      below: await grow(Int32Array.from(below), level + 1, candidate.belowPositive, candidate.belowNegative),
      above: await grow(Int32Array.from(above), level + 1, candidate.abovePositive, candidate.aboveNegative),
    };
  };
  return grow(null, 1, positive, negative);
}

/**
 * Turns a grown tree into a weak classifier and decides whether boosting goes on, with the
 * booster's tree formulas (booster.ts): the tree's error is the sum of its leaves'
 * leafError; no better than chance (or no split at all) stops boosting; otherwise every
 * leaf outputs leafOutput · treeScale(error) — Discrete AdaBoost's ±α with
 * α = ½ ln((1 − ε)/ε), Gentle AdaBoost's weighted label means. A tree of error
 * ≤ PERFECT_ERROR is kept and stops boosting, as a perfect stump does.
 */
export function decideTreeRound(grown: GrownBranch, booster: BoosterKind): TreeRoundOutcome {
  if (isGrownLeaf(grown)) return { kind: 'stop', reason: 'no-better-than-chance' };
  const formulas = boosterFormulas(booster);
  let error = 0;
  let positive = 0;
  let negative = 0;
  const sum = (branch: GrownBranch): void => {
    if (isGrownLeaf(branch)) {
      error += formulas.leafError(branch.positive, branch.negative);
      positive += branch.positive;
      negative += branch.negative;
      return;
    }
    sum(branch.below);
    sum(branch.above);
  };
  sum(grown);
  if (formulas.isTreeNoBetterThanChance(error, positive, negative)) return { kind: 'stop', reason: 'no-better-than-chance' };
  const alpha = formulas.treeScale(error);
  const withOutputs = (branch: GrownBranch): MatrixBranch => (isGrownLeaf(branch)
    ? { output: formulas.leafOutput(branch.positive, branch.negative) * alpha }
    : { feature: branch.feature, bin: branch.bin, below: withOutputs(branch.below), above: withOutputs(branch.above) });
  const tree: ChosenTree = { root: withOutputs(grown) as MatrixSplit, weightedError: error, alpha };
  return error <= PERFECT_ERROR ? { kind: 'stop', reason: 'perfect-separation', tree } : { kind: 'round', tree };
}

/** The tree's output on every training sample, from the matrix rows (bins < bin → below). */
export function treeOutputs(matrix: Pick<ResponseMatrix, 'bins' | 'sampleCount'>, root: MatrixSplit): Float64Array {
  const n = matrix.sampleCount;
  const outputs = new Float64Array(n);
  for (let s = 0; s < n; s++) {
    let branch: MatrixBranch = root;
    while (!isMatrixLeaf(branch)) branch = matrix.bins[branch.feature * n + s]! < branch.bin ? branch.below : branch.above;
    outputs[s] = branch.output;
  }
  return outputs;
}

/** Depth-first walk of a matrix tree, for callers that map it to model terms. */
export function mapMatrixTree<Split, Leaf>(
  branch: MatrixBranch,
  split: (feature: number, bin: number, below: Split | Leaf, above: Split | Leaf) => Split,
  leaf: (output: number) => Leaf,
): Split | Leaf {
  if (isMatrixLeaf(branch)) return leaf(branch.output);
  return split(branch.feature, branch.bin, mapMatrixTree(branch.below, split, leaf), mapMatrixTree(branch.above, split, leaf));
}
