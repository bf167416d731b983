import { featureCells, type WeightedRectangle } from '../features/haar-feature.js';
import { branchDepth, isDecisionTree, isTreeLeaf, type CascadeModel, type TreeBranch, type TreeLeaf, type WeakClassifier } from '../model/cascade-model.js';

/**
 * The part of a cascade that detection needs, with every feature spelled out as
 * weighted rectangles in base-window coordinates (half-open {x, y, width, height},
 * per-pixel weight). Both the full model (CascadeModel) and the runtime-only
 * export reduce to this form, so they scan identically by construction.
 *
 * Semantics (same as CascadeModel): a split's normalized value is
 * Σ weight · (pixel sum of rectangle) / σ(window); a stump adds `belowOutput` when that
 * value < splitValue, else `aboveOutput`; a tree follows its splits to a leaf and adds the
 * leaf's output; a window passes a stage when the sum of its weak outputs ≥ threshold.
 */
export type DetectorWeakClassifier = DetectorStump | DetectorTree;

/** A decision stump of a DetectorCascade. */
export interface DetectorStump {
  readonly rectangles: readonly WeightedRectangle[];
  readonly splitValue: number;
  readonly belowOutput: number;
  readonly aboveOutput: number;
}

/** One split of a DetectorTree. */
export interface DetectorTreeSplit {
  /** Empty for a placeholder (value 0), which stands where the tree stopped early. */
  readonly rectangles: readonly WeightedRectangle[];
  readonly splitValue: number;
}

/**
 * A decision tree of depth d (2..MAX_TREE_DEPTH) stored as a full binary tree in heap
 * order, the form the scan kernel evaluates without branching per window: split k sends
 * value < splitValue to 2k + 1 and the rest to 2k + 2; indices from 2^d − 1 on are leaves.
 * Where the trained tree stopped early, a placeholder split (no rectangles, splitValue 0)
 * leads to copies of the one leaf, so every path has d splits and the output is unchanged.
 */
export interface DetectorTree {
  /** 2^d − 1 splits in heap order. */
  readonly splits: readonly DetectorTreeSplit[];
  /** 2^d leaf outputs, left to right (leaf j is heap index 2^d − 1 + j). */
  readonly leaves: readonly number[];
}

/** True for the tree shape of DetectorWeakClassifier. */
export function isDetectorTree(weak: DetectorWeakClassifier): weak is DetectorTree {
  return 'leaves' in weak;
}

/**
 * The leaf output a DetectorTree gives a window whose split values are valueOf(k) for
 * split k (only the splits on the window's path are asked for).
 */
export function detectorTreeOutput(tree: DetectorTree, valueOf: (split: number) => number): number {
  let k = 0;
  while (k < tree.splits.length) k = 2 * k + (valueOf(k) < tree.splits[k]!.splitValue ? 1 : 2);
  return tree.leaves[k - tree.splits.length]!;
}

/** One stage of a DetectorCascade. */
export interface DetectorStage {
  readonly threshold: number;
  readonly weakClassifiers: readonly DetectorWeakClassifier[];
}

/** A cascade ready to scan: window size in pixels and stages in evaluation order. */
export interface DetectorCascade {
  readonly windowWidth: number;
  readonly windowHeight: number;
  readonly stages: readonly DetectorStage[];
}

/**
 * Spells out a model's features as weighted rectangles (featureCells).
 * Drops training provenance; the model is not modified.
 * @example detectorCascadeFromModel(model).stages[0]!.weakClassifiers[0]!.rectangles
 */
export function detectorCascadeFromModel(model: Pick<CascadeModel, 'window' | 'stages'>): DetectorCascade {
  return {
    windowWidth: model.window.width,
    windowHeight: model.window.height,
    stages: model.stages.map((stage) => ({
      threshold: stage.threshold,
      weakClassifiers: stage.weakClassifiers.map(detectorWeakClassifier),
    })),
  };
}

/** One weak classifier of a model with its features spelled out as weighted rectangles (featureCells). */
export function detectorWeakClassifier(weak: WeakClassifier): DetectorWeakClassifier {
  if (!isDecisionTree(weak)) {
    return { rectangles: featureCells(weak.feature), splitValue: weak.splitValue, belowOutput: weak.belowOutput, aboveOutput: weak.aboveOutput };
  }
  const splitCount = 2 ** branchDepth(weak.tree) - 1;
  const splits = new Array<DetectorTreeSplit>(splitCount);
  const leaves = new Array<number>(splitCount + 1);
  const place = (branch: TreeBranch, index: number): void => {
    if (index >= splitCount) {
      // (a branch reaching the bottom index is a leaf: the depth bounds every path)
      leaves[index - splitCount] = (branch as TreeLeaf).output;
      return;
    }
    if (isTreeLeaf(branch)) {
      splits[index] = { rectangles: [], splitValue: 0 };
      place(branch, 2 * index + 1);
      place(branch, 2 * index + 2);
      return;
    }
    splits[index] = { rectangles: featureCells(branch.feature), splitValue: branch.splitValue };
    place(branch.below, 2 * index + 1);
    place(branch.above, 2 * index + 2);
  };
  place(weak.tree, 0);
  return { splits, leaves };
}

/**
 * True when some weak classifier has a tilted rectangle: the cascade then needs the
 * rotated table (computeIntegralImage(image, { rotated: true })), and basic cascades
 * keep the upright tables alone.
 */
export function cascadeUsesTiltedFeatures(cascade: Pick<DetectorCascade, 'stages'>): boolean {
  return cascade.stages.some((stage) => stage.weakClassifiers.some((weak) => (isDetectorTree(weak) ? weak.splits.flatMap((split) => split.rectangles) : weak.rectangles).some((rectangle) => rectangle.tilted === true)));
}
