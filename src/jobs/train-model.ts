import { availableParallelism } from 'node:os';
import { DEFAULT_NEGATIVE_PATCH_SHARE, heldOutCount, trainCascade, type CascadeTrainingOptions, type CascadeTrainingResult, type TrainingEvent } from '../cascade/build-cascade.js';
import { MAX_TREE_DEPTH, newCascadeModel, type CascadeModel, type Stage } from '../cascade/cascade-model.js';
import { checkInteger } from '../check.js';
import { loadBackgroundImages } from '../data/backgrounds.js';
import { loadPositiveWindows } from '../data/positives.js';
import { RectboostError, isRectboostError } from '../errors.js';
import { checkOneOf } from '../check.js';
import { FEATURE_SET_NAMES } from '../features/feature-kind.js';
import { readCheckpoint, removeCheckpoint, writeCheckpoint, type TrainingFingerprint } from '../io/checkpoint.js';
import { saveCascadeModel } from '../io/model-file.js';
import { createBoostingPool } from '../parallel/boosting-pool.js';

/** Default of `TrainModelOptions.tool`, recorded in every model's provenance. */
export const TOOL_NAME = 'rectboost 0.1.0';

/** The training targets and limits, as trainCascade documents them (memoryBytes: the cap for the precomputed feature responses, in bytes). */
type CascadeTargets = Pick<
  CascadeTrainingOptions,
  | 'windowWidth' | 'windowHeight' | 'stageDetectionRate' | 'stageFalsePositiveRate' | 'targetFalsePositiveRate' | 'maxStages'
  | 'maxWeakClassifiers' | 'negativesPerStage' | 'booster' | 'mirror' | 'validationShare' | 'seed' | 'memoryBytes' | 'featureSet'
>;

/**
 * The default training targets and limits: the one place they are stated. `rectboost train`
 * shows them in --help and trainModel fills in every target its caller leaves out.
 * Sources: stage detection 0.995 and false-positive 0.5 per stage follow Viola & Jones 2001 §4
 * (each stage keeps nearly all positives and halves the negatives; the exact figures are
 * common practice); the others were chosen by measurement (README, "Choosing the defaults").
 */
export const TRAINING_DEFAULTS: Readonly<CascadeTargets> = {
  windowWidth: 24,
  windowHeight: 24,
  stageDetectionRate: 0.995,
  stageFalsePositiveRate: 0.5,
  targetFalsePositiveRate: 1e-5,
  maxStages: 20,
  maxWeakClassifiers: 200,
  negativesPerStage: 2000,
  booster: 'gentle',
  mirror: false,
  validationShare: 0.2,
  seed: 1,
  memoryBytes: 4 * 1024 ** 3,
};

/**
 * Everything one training run needs: where the data is, where the model goes, and the
 * training targets; a target left out takes its value from TRAINING_DEFAULTS.
 */
export interface TrainModelOptions extends Partial<CascadeTargets> {
  /** A folder of positive patches, or an annotation file whose boxes are cropped from full images. */
  readonly positives: string;
  /** A folder of images with no object in them. */
  readonly backgrounds: string;
  /** The model file to write (atomically). */
  readonly out: string;
  /** Boosting worker threads (default: all cores); the model does not depend on it. */
  readonly workers?: number;
  /** Where finished stages are saved after every stage (default: OUT without .json, plus .checkpoint). */
  readonly checkpointDirectory?: string;
  /** Continue from the checkpoint of an earlier run with the same options and data (a missing checkpoint starts afresh). */
  readonly resume?: boolean;
  /** Train without unreadable images instead of stopping before the run. */
  readonly skipBad?: boolean;
  /** Record wall-clock times in the model (default true); false gives byte-for-byte reproducible files. */
  readonly recordTiming?: boolean;
  /** Go on after a stage that stalls at maxWeakClassifiers (default false: stop there and keep the model). */
  readonly keepGoing?: boolean;
  /**
   * A folder of windows to be rejected (any size; converted to gray and resized to the window):
   * confusable objects, or the false-alarms folder that `rectboost evaluate --errors` writes.
   * Every stage takes those its cascade still accepts, up to `negativePatchShare` of its
   * negatives (see trainCascade). Its content hash is part of the provenance and of the
   * checkpoint fingerprint.
   */
  readonly negativePatches?: string;
  /** Largest share of a stage's negatives taken from the negative patches (default DEFAULT_NEGATIVE_PATCH_SHARE = 0.5). */
  readonly negativePatchShare?: number;
  /** Augmented copies of every training positive (default 0; see trainCascade's augmentCopies). */
  readonly augmentCopies?: number;
  /** Depth of every weak classifier, 1..3 (default 1: decision stumps; see trainCascade's weakDepth). */
  readonly weakDepth?: number;
  /** Train on the first N positives only. */
  readonly positiveLimit?: number;
  /** Name of the program, recorded in the provenance (default TOOL_NAME). */
  readonly tool?: string;
  readonly onEvent?: (event: TrainModelEvent) => void;
  /** Aborting stops training after the current step; the finished stages are written to OUT and the checkpoint. */
  readonly signal?: AbortSignal;
}

/** Progress of a training run: reading and checking the data, then the cascade's own events. */
export type TrainModelEvent =
  | TrainingEvent
  | { readonly phase: 'reading'; readonly what: 'positives' | 'backgrounds' | 'negative patches'; readonly done: number; readonly total: number }
  | { readonly phase: 'skipped'; readonly line: string }
  | { readonly phase: 'data'; readonly positives: number; readonly backgroundImages: number; readonly negativePatches: number; readonly workers: number }
  | { readonly phase: 'resumed'; readonly stages: number; readonly checkpointDirectory: string }
  | { readonly phase: 'no-checkpoint'; readonly checkpointDirectory: string };

export interface TrainedModel {
  /** What was written to `out` (also when interrupted, if at least one stage had finished). */
  readonly model: CascadeModel;
  readonly result: CascadeTrainingResult;
  /** Whether `out` was written: false only when interrupted before the first stage finished. */
  readonly written: boolean;
  readonly checkpointDirectory: string;
  readonly seconds: number;
}

/** Stop reason recorded in a model (and checkpoint) whose training was interrupted. */
export const INTERRUPTED_STOP_REASON = 'interrupted';

/**
 * Trains a cascade from files to a model file, as `rectboost train` does: checks every
 * input before any long work, records provenance (options, seed, data counts and content
 * hashes, stop reason, times), writes a checkpoint atomically after every stage, resumes
 * from one (same result as an uninterrupted run), and always leaves the finished work
 * behind: when `signal` aborts, the finished stages are written to `out` (stop reason
 * "interrupted") and kept in the checkpoint, and the result says so
 * (`result.stopReason === 'interrupted'`). A process killed at any moment leaves either
 * no `out` or a complete one, and a checkpoint that `resume` accepts (all writes are
 * atomic). On a finished run the checkpoint is removed.
 * @throws RectboostError `bad-data` / `bad-image` for unusable inputs (before training starts),
 *   `bad-data` for a checkpoint of other options or data, `invalid-option` for out-of-range options.
 * @example
 * const { result } = await trainModel({ positives: 'rivets/', backgrounds: 'panels/', out: 'rivets.json', maxStages: 8 });
 */
export async function trainModel(given: TrainModelOptions): Promise<TrainedModel> {
  const started = performance.now();
  const options = withTrainingDefaults(given);
  const emit = (event: TrainModelEvent): void => options.onEvent?.(event);
  const window = { width: options.windowWidth, height: options.windowHeight };
  const workers = options.workers ?? availableParallelism();
  const skipBad = options.skipBad === true;
  const checkpointDirectory = options.checkpointDirectory ?? `${options.out.replace(/\.json$/i, '')}.checkpoint`;

  // 1. Check every input before any long work.
  const positives = await loadPositiveWindows(options.positives, {
    windowWidth: window.width,
    windowHeight: window.height,
    mirror: false,
    skipBad,
    onProgress: (done, total) => emit({ phase: 'reading', what: 'positives', done, total }),
  });
  const backgrounds = await loadBackgroundImages(options.backgrounds, {
    windowWidth: window.width,
    windowHeight: window.height,
    skipBad,
    onProgress: (done, total) => emit({ phase: 'reading', what: 'backgrounds', done, total }),
  });
  const patches = options.negativePatches === undefined
    ? undefined
    : await loadPositiveWindows(options.negativePatches, {
      windowWidth: window.width,
      windowHeight: window.height,
      mirror: false,
      skipBad,
      onProgress: (done, total) => emit({ phase: 'reading', what: 'negative patches', done, total }),
    });
  const patchShare = options.negativePatchShare ?? DEFAULT_NEGATIVE_PATCH_SHARE;
  const augmentCopies = options.augmentCopies ?? 0;
  const weakDepth = checkInteger('weak classifier depth', options.weakDepth ?? 1, 1, MAX_TREE_DEPTH);
  for (const line of [...positives.skipped, ...backgrounds.skipped, ...(patches?.skipped ?? [])]) emit({ phase: 'skipped', line: line.trim() });
  const positiveWindows = options.positiveLimit === undefined ? positives.windows : positives.windows.slice(0, options.positiveLimit);
  const minimumPositives = options.validationShare > 0 ? 3 : 2;
  if (positiveWindows.length < minimumPositives) {
    throw new RectboostError('bad-data', `Training needs at least ${minimumPositives} positive patches; ${options.positives} has ${positiveWindows.length}.`);
  }
  emit({ phase: 'data', positives: positiveWindows.length, backgroundImages: backgrounds.images.length, negativePatches: patches?.windows.length ?? 0, workers });

  // 2. Provenance and the fingerprint a checkpoint must match.
  const featureSet = checkOneOf('feature set', options.featureSet ?? 'basic', FEATURE_SET_NAMES);
  const recorded = {
    window: `${window.width}x${window.height}`,
    stageDetection: options.stageDetectionRate,
    stageFalsePositive: options.stageFalsePositiveRate,
    targetFalsePositive: options.targetFalsePositiveRate,
    maxStages: options.maxStages,
    maxWeak: options.maxWeakClassifiers,
    negatives: options.negativesPerStage,
    booster: options.booster,
    features: featureSet,
    mirror: options.mirror,
    validation: options.validationShare,
    memory: options.memoryBytes,
    ...(options.keepGoing === true ? { keepGoing: true } : {}),
    ...(options.positiveLimit === undefined ? {} : { positiveLimit: options.positiveLimit }),
    ...(patches === undefined ? {} : { negativePatchShare: patchShare }),
    ...(augmentCopies === 0 ? {} : { augment: augmentCopies }),
    // (recorded when not the default, so stump runs keep the provenance and checkpoints they had)
    ...(weakDepth === 1 ? {} : { weakDepth }),
  };
  const fingerprint: TrainingFingerprint = {
    ...recorded,
    seed: options.seed,
    positivesHash: positives.contentHash,
    backgroundsHash: backgrounds.contentHash,
    ...(patches === undefined ? {} : { negativePatchesHash: patches.contentHash }),
  };
  let completedStages: readonly Stage[] = [];
  const stageSeconds: number[] = [];
  if (options.resume === true) {
    try {
      const checkpoint = await readCheckpoint(checkpointDirectory, fingerprint);
      completedStages = checkpoint.model.stages;
      stageSeconds.push(...checkpoint.stageSeconds);
      emit({ phase: 'resumed', stages: completedStages.length, checkpointDirectory });
    } catch (error) {
      // Killed before its first stage finished, a run leaves no checkpoint: start afresh, and say so.
      if (!(isRectboostError(error, 'bad-data') && /There is no checkpoint/.test(error.message))) throw error;
      emit({ phase: 'no-checkpoint', checkpointDirectory });
    }
  }
  const buildModel = (stages: readonly Stage[], stopReason: string, meanPositive?: readonly number[]): CascadeModel =>
    newCascadeModel(window, stages, {
      featureSet,
      ...(meanPositive === undefined ? {} : { meanPositive }),
      training: {
        tool: options.tool ?? TOOL_NAME,
        seed: options.seed,
        options: recorded,
        data: {
          positives: positiveWindows.length,
          validationPositives: heldOutCount(positiveWindows.length, options.validationShare),
          backgroundImages: backgrounds.images.length,
          positivesHash: positives.contentHash,
          backgroundsHash: backgrounds.contentHash,
          ...(patches === undefined ? {} : { negativePatches: patches.windows.length, negativePatchesHash: patches.contentHash }),
        },
        stopReason,
        ...(options.recordTiming === false
          ? {}
          : { timing: { createdAt: new Date().toISOString(), totalSeconds: round3(stageSeconds.reduce((a, b) => a + b, 0)), stageSeconds: stageSeconds.map(round3) } }),
      },
    });

  // 3. Train, saving after every stage.
  const pool = await createBoostingPool(workers);
  let result: CascadeTrainingResult;
  try {
    result = await trainCascade({
      windowWidth: window.width,
      windowHeight: window.height,
      positives: positiveWindows,
      backgrounds: backgrounds.images.filter((image) => image.width >= window.width && image.height >= window.height),
      stageDetectionRate: options.stageDetectionRate,
      stageFalsePositiveRate: options.stageFalsePositiveRate,
      targetFalsePositiveRate: options.targetFalsePositiveRate,
      maxStages: options.maxStages,
      maxWeakClassifiers: options.maxWeakClassifiers,
      negativesPerStage: options.negativesPerStage,
      booster: options.booster,
      mirror: options.mirror,
      validationShare: options.validationShare,
      seed: options.seed,
      memoryBytes: options.memoryBytes,
      featureSet,
      ...(patches === undefined ? {} : { negativePatches: patches.windows, negativePatchShare: patchShare }),
      augmentCopies,
      weakDepth,
      stopWhenStalled: options.keepGoing !== true,
      pool,
      completedStages,
      shouldStop: () => options.signal?.aborted === true,
      onEvent: emit,
      onStageFinished: async (stages, report) => {
        stageSeconds.push(report.seconds);
        await writeCheckpoint(checkpointDirectory, { model: buildModel(stages, INTERRUPTED_STOP_REASON), fingerprint, stageSeconds });
      },
    });
  } finally {
    await pool.close();
  }

  // 4. Write the model: the finished one, or the stages an interrupted run finished.
  const interrupted = result.stopReason === 'interrupted';
  const model = buildModel(result.stages, interrupted ? INTERRUPTED_STOP_REASON : result.stopMessage, result.meanPositive);
  const written = result.stages.length > 0 || !interrupted;
  if (written) await saveCascadeModel(options.out, model);
  if (!interrupted) await removeCheckpoint(checkpointDirectory);
  return { model, result, written, checkpointDirectory, seconds: (performance.now() - started) / 1000 };
}

/** The caller's options with every target it left out (or set to undefined) taken from TRAINING_DEFAULTS. */
function withTrainingDefaults(given: TrainModelOptions): TrainModelOptions & CascadeTargets {
  const stated = Object.fromEntries(Object.entries(given).filter(([, value]) => value !== undefined)) as TrainModelOptions;
  return { ...TRAINING_DEFAULTS, ...stated };
}

function round3(value: number): number {
  return Math.round(value * 1000) / 1000;
}
