import { isDecisionTree, isTreeLeaf, type CascadeModel, type Stage, type TreeBranch, type WeakClassifier } from '../../src/cascade/cascade-model.js';
import type { HaarFeature } from '../../src/features/haar-feature.js';
import { evaluateNormalizedFeature } from '../../src/features/evaluate-feature.js';
import type { GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { windowInverseDeviation } from '../../src/image/window-statistics.js';

/**
 * The plain-JS, window-by-window reference for evaluation over lists of windows (the
 * twin of src/detect/window-list.ts and the scan kernel): each window gets its own
 * integral image (with the rotated table, for tilted features), its σ from the σ rule (windowInverseDeviation), every feature from
 * its rectangles (evaluateNormalizedFeature), outputs summed from 0 in order, and a
 * stage passes when score − threshold ≥ 0 (the kernel's test, written the kernel's way).
 * Flat windows pass no stage of any cascade and score −∞.
 */
export interface TwinDepth {
  /** Stages passed before the first failure (stages.length when accepted). */
  readonly stagesPassed: number;
  /** Margin of the failing stage, or of the last when accepted (0 without stages); −∞ when flat. */
  readonly margin: number;
  /** Sum of the margins of the stages passed, in stage order (the detection score when accepted); 0 when none. */
  readonly evidence: number;
}

/**
 * A weak classifier's output, the obvious way: a stump compares its feature's value with
 * its split; a tree walks from its root, each split sending v < splitValue below, to a leaf.
 */
export function twinWeakOutput(weak: WeakClassifier, valueOf: (feature: HaarFeature) => number): number {
  if (!isDecisionTree(weak)) return valueOf(weak.feature) < weak.splitValue ? weak.belowOutput : weak.aboveOutput;
  let branch: TreeBranch = weak.tree;
  while (!isTreeLeaf(branch)) branch = valueOf(branch.feature) < branch.splitValue ? branch.below : branch.above;
  return branch.output;
}

/** Σ outputs of one stage on one window; −∞ for a flat window. */
export function twinStageScore(stage: Pick<Stage, 'weakClassifiers'>, window: GrayImage): number {
  const integral = computeIntegralImage(window, { rotated: true });
  if (windowInverseDeviation(integral, 0, 0, window.width, window.height) === 0) return -Infinity;
  let score = 0;
  for (const weak of stage.weakClassifiers) {
    score += twinWeakOutput(weak, (feature) => evaluateNormalizedFeature(integral, feature, 0, 0, window.width, window.height));
  }
  return score;
}

/** How far one window gets through the cascade. */
export function twinDepth(model: Pick<CascadeModel, 'stages'>, window: GrayImage): TwinDepth {
  const integral = computeIntegralImage(window, { rotated: true });
  if (windowInverseDeviation(integral, 0, 0, window.width, window.height) === 0) return { stagesPassed: 0, margin: -Infinity, evidence: 0 };
  let margin = 0;
  let evidence = 0;
  for (let k = 0; k < model.stages.length; k++) {
    const stage = model.stages[k]!;
    margin = twinStageScore(stage, window) - stage.threshold;
    if (margin < 0) return { stagesPassed: k, margin, evidence };
    evidence = k === 0 ? margin : evidence + margin;
  }
  return { stagesPassed: model.stages.length, margin, evidence };
}

/** Stages passed by each window (the old training-side scorer's contract, now a test twin). */
export function twinStagesPassed(model: Pick<CascadeModel, 'stages'>, windows: readonly GrayImage[]): number[] {
  return windows.map((window) => twinDepth(model, window).stagesPassed);
}
