import type { FeatureSetName } from '../features/feature-kind.js';
import type { HaarFeature } from '../features/haar-feature.js';

/** Value of the model file's `format` field. */
export const CASCADE_FORMAT = 'rectboost-cascade';
/** Current model file version; loading refuses other versions. */
export const CASCADE_VERSION = 1;

/**
 * One weak classifier: a thresholded Haar-like feature (a decision stump).
 * On a window, let v be the feature's variance-normalized value (raw value / window σ,
 * see evaluateNormalizedFeature). The weak classifier adds `belowOutput` to the stage
 * score when v < splitValue and `aboveOutput` otherwise.
 *
 * Discrete AdaBoost stores ±α as the two outputs (Freund & Schapire 1997);
 * Gentle AdaBoost stores the two weighted means of the labels (Friedman, Hastie &
 * Tibshirani 2000). Both are plain real-valued outputs here.
 */
export interface WeakClassifier {
  readonly feature: HaarFeature;
  readonly splitValue: number;
  readonly belowOutput: number;
  readonly aboveOutput: number;
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
