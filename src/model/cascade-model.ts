import type { FeatureSetName } from '../features/feature-kind.js';
import type { HaarFeature } from '../features/haar-feature.js';

/** Value of the model file's `format` field. */
export const CASCADE_FORMAT = 'rectboost-cascade';
/** Current model file version; loading refuses other versions. */
export const CASCADE_VERSION = 1;

/**
 * One weak classifier: a decision stump or a small decision tree over Haar-like features.
 * On a window, let v be a feature's variance-normalized value (raw value / window σ,
 * see evaluateNormalizedFeature).
 *
 * - DecisionStump (the default weak learner, and the only shape before trees existed):
 *   adds `belowOutput` to the stage score when v < splitValue and `aboveOutput` otherwise.
 * - DecisionTree: a tree of depth 2..MAX_TREE_DEPTH whose splits each test their own
 *   feature the same way (v < splitValue goes `below`); the leaf reached adds its `output`.
 *   A depth-1 tree is always written as a stump, so each weak classifier has one spelling.
 *
 * Discrete AdaBoost stores ±α as outputs (Freund & Schapire 1997); Gentle AdaBoost stores
 * weighted means of the labels (Friedman, Hastie & Tibshirani 2000). Both are plain
 * real-valued outputs here.
 */
export type WeakClassifier = DecisionStump | DecisionTree;

/** A thresholded Haar-like feature with two outputs (see WeakClassifier). */
export interface DecisionStump {
  readonly feature: HaarFeature;
  readonly splitValue: number;
  readonly belowOutput: number;
  readonly aboveOutput: number;
}

/** A small decision tree (see WeakClassifier); `tree` is its root split. */
export interface DecisionTree {
  readonly tree: TreeSplit;
}

/** One split of a decision tree: windows with v < splitValue take `below`, the others `above`. */
export interface TreeSplit {
  readonly feature: HaarFeature;
  readonly splitValue: number;
  readonly below: TreeBranch;
  readonly above: TreeBranch;
}

/**
 * A leaf of a decision tree: the output it adds. Trees may be incomplete — a node that
 * was pure or had no split is a leaf above the bottom level.
 */
export interface TreeLeaf {
  readonly output: number;
}

/** What a side of a tree split leads to. */
export type TreeBranch = TreeSplit | TreeLeaf;

/** Deepest tree a weak classifier may be (the scan kernel's node scratch holds this many levels). */
export const MAX_TREE_DEPTH = 3;

/** True for the tree shape of WeakClassifier. */
export function isDecisionTree(weak: WeakClassifier): weak is DecisionTree {
  return 'tree' in weak;
}

/** True when a tree branch is a leaf. */
export function isTreeLeaf(branch: TreeBranch): branch is TreeLeaf {
  return 'output' in branch;
}

/** Levels of splits below and including `branch`: 0 for a leaf, 1 for a split of two leaves. */
export function branchDepth(branch: TreeBranch): number {
  return isTreeLeaf(branch) ? 0 : 1 + Math.max(branchDepth(branch.below), branchDepth(branch.above));
}

/** Depth of a weak classifier: 1 for a stump, the tree's depth otherwise. */
export function weakClassifierDepth(weak: WeakClassifier): number {
  return isDecisionTree(weak) ? branchDepth(weak.tree) : 1;
}

/** Every split of a weak classifier in depth-first order (below before above): one for a stump. */
export function weakClassifierSplits(weak: WeakClassifier): ReadonlyArray<Pick<TreeSplit, 'feature' | 'splitValue'>> {
  if (!isDecisionTree(weak)) return [weak];
  const splits: TreeSplit[] = [];
  const visit = (branch: TreeBranch): void => {
    if (isTreeLeaf(branch)) return;
    splits.push(branch);
    visit(branch.below);
    visit(branch.above);
  };
  visit(weak.tree);
  return splits;
}

/**
 * The one spelling of a weak classifier with root split `root`: a stump when both sides
 * are leaves, a tree otherwise.
 * @example weakClassifierFromTree({ feature, splitValue: 0.1, below: { output: -1 }, above: { output: 1 } }) // a DecisionStump
 */
export function weakClassifierFromTree(root: TreeSplit): WeakClassifier {
  if (isTreeLeaf(root.below) && isTreeLeaf(root.above)) {
    return { feature: root.feature, splitValue: root.splitValue, belowOutput: root.below.output, aboveOutput: root.above.output };
  }
  return { tree: root };
}

/** What training measured for one stage (kept in the model as provenance). */
export interface StageTrainingRecord {
  /** Detection rate on the held-out validation positives, with the stage threshold. */
  readonly detectionRate: number;
  /** False-positive rate on this stage's training negatives, with the stage threshold. */
  readonly falsePositiveRate: number;
  readonly positives: number;
  readonly negatives: number;
  /**
   * How many of `negatives` were negative patches the cascade still accepted (the rest were
   * mined from backgrounds). Absent in models trained before negative patches existed (read as 0).
   */
  readonly negativesFromPatches?: number;
  /** Background windows looked at to find the negatives (mining cost). */
  readonly windowsScanned: number;
  /** Candidate features boosting searched (fewer than all when the memory cap sampled a subset). */
  readonly featuresUsed: number;
  /** Why boosting stopped: the targets were met, or the weak-classifier limit was hit. */
  readonly stoppedBecause: 'targets-met' | 'max-weak-classifiers' | 'perfect-separation' | 'no-better-than-chance';
}

/**
 * A stage: a boosted sum of weak classifiers. A window passes the stage when
 * Σ outputs ≥ threshold (Viola & Jones 2001 §4: the stage threshold is lowered
 * from the boosting default to keep a target detection rate).
 */
export interface Stage {
  readonly threshold: number;
  readonly weakClassifiers: readonly WeakClassifier[];
  readonly training?: StageTrainingRecord;
}

/** Training provenance: everything needed to know how a model was made. */
export interface TrainingProvenance {
  readonly tool: string;
  readonly seed: number;
  readonly options: Readonly<Record<string, string | number | boolean | null>>;
  readonly data: {
    readonly positives: number;
    readonly validationPositives: number;
    readonly backgroundImages: number;
    /** SHA-256 over the sorted relative paths and bytes of every input file. */
    readonly positivesHash: string;
    readonly backgroundsHash: string;
    /** Negative patches given to training (count and content hash), when any were. */
    readonly negativePatches?: number;
    readonly negativePatchesHash?: string;
  };
  /** Why training ended: target reached, stage limit, or backgrounds exhausted. */
  readonly stopReason: string;
  /**
   * Wall-clock facts (kept apart so that everything else is reproducible byte for
   * byte; `train --no-timing` leaves this out).
   */
  readonly timing?: {
    readonly createdAt: string;
    readonly totalSeconds: number;
    readonly stageSeconds: readonly number[];
  };
}

/**
 * A trained cascade: stages in evaluation order. A window is accepted when it
 * passes every stage; a cascade with no stages accepts every window.
 */
export interface CascadeModel {
  readonly format: typeof CASCADE_FORMAT;
  readonly version: typeof CASCADE_VERSION;
  readonly window: { readonly width: number; readonly height: number };
  /** Feature values are divided by the window's pixel standard deviation. */
  readonly normalization: 'window-standard-deviation';
  readonly featureSet: FeatureSetName;
  readonly stages: readonly Stage[];
  /** Mean of the training positives, row-major window pixels 0..255 (for inspect drawings). */
  readonly meanPositive?: readonly number[];
  readonly training?: TrainingProvenance;
}

/**
 * A model of the current format and version around trained stages: the one
 * place that fills in the fixed fields (format, version, normalization) and the feature
 * set (default `basic`).
 * @example newCascadeModel({ width: 24, height: 24 }, stages, { meanPositive })
 */
export function newCascadeModel(
  window: { readonly width: number; readonly height: number },
  stages: readonly Stage[],
  extras: { readonly featureSet?: FeatureSetName; readonly meanPositive?: readonly number[]; readonly training?: TrainingProvenance } = {},
): CascadeModel {
  return {
    format: CASCADE_FORMAT,
    version: CASCADE_VERSION,
    window: { width: window.width, height: window.height },
    normalization: 'window-standard-deviation',
    featureSet: extras.featureSet ?? 'basic',
    stages,
    ...(extras.meanPositive === undefined ? {} : { meanPositive: extras.meanPositive }),
    ...(extras.training === undefined ? {} : { training: extras.training }),
  };
}
