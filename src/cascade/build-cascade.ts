import seedrandom from 'seedrandom';
import type { BoosterKind } from '../boost/booster.js';
import { stageBuffersForRun, type StageBuffers } from '../boost/stage-buffers.js';
import { trainStage } from '../boost/train-stage.js';
import type { BoostingPool } from '../boost/boosting-pool-contract.js';
import { checkInteger, checkNumber, checkOneOf, checkOpenInterval, checkThat } from '../check.js';
import { RectboostError, isRectboostError } from '../errors.js';
import { enumerateFeatures } from '../features/enumerate-features.js';
import { FEATURE_SET_KINDS, FEATURE_SET_NAMES, type FeatureSetName } from '../features/feature-kind.js';
import { featuresNeedRotatedTable } from '../features/haar-feature.js';
import { packWindowSamples } from '../features/window-samples.js';
import { augmentWindows } from '../image/augment-window.js';
import { mirrorGrayImage, type GrayImage } from '../image/gray-image.js';
import type { Stage } from './cascade-model.js';
import { BackgroundWindows, mineHardNegatives, sampleUniformNegatives } from './negative-mining.js';
import { cascadeUsesTiltedFeatures, detectorCascadeFromModel } from '../detect/detector-cascade.js';
import { acceptSamples } from '../detect/window-list.js';

/** Options of cascade training; defaults are those of `rectboost train`. */
export interface CascadeTrainingOptions {
  readonly windowWidth: number;
  readonly windowHeight: number;
  /** Positive windows (windowWidth × windowHeight), before mirroring. */
  readonly positives: readonly GrayImage[];
  /** Background images without objects, each at least the window size. */
  readonly backgrounds: readonly GrayImage[];
  /** Minimum detection rate every stage keeps on validation positives (default 0.995). */
  readonly stageDetectionRate: number;
  /** Maximum false-positive rate a stage lets through (default 0.5). */
  readonly stageFalsePositiveRate: number;
  /** Stop when the product of stage false-positive rates is at or below this (default 1e-5). */
  readonly targetFalsePositiveRate: number;
  readonly maxStages: number;
  readonly maxWeakClassifiers: number;
  /** Negatives mined for every stage. */
  readonly negativesPerStage: number;
  readonly booster: BoosterKind;
  /** Add left-right mirrored copies of every positive (kept on the same side of the validation split). */
  readonly mirror: boolean;
  /** Share of positives held out to set stage thresholds, in [0, 0.9]; 0 uses the training positives. */
  readonly validationShare: number;
  readonly seed: number;
  readonly memoryBytes: number;
  /**
   * Candidate feature kinds (FEATURE_SET_KINDS): `basic` (default) or `extended`, which
   * adds the tilted and centre-surround kinds; every sample and background table then
   * carries the rotated table too.
   */
  readonly featureSet?: FeatureSetName;
  /**
   * Windows to be rejected (windowWidth × windowHeight): confusable objects, or the false
   * alarms of an earlier run. Every stage takes those the cascade so far still accepts as
   * negatives, up to `negativePatchShare` of `negativesPerStage` (a seeded sample when more
   * are accepted), and mines the rest from the backgrounds. They get the same initial
   * weight as mined negatives, and form their own group for the stage's false-positive
   * target: a stage must let through at most stageFalsePositiveRate of the patches it was given
   * and of the mined windows alike (trainStage's leadingNegatives), else the easy background
   * windows would meet the target alone and the patches would pass stage after stage. Default none.
   */
  readonly negativePatches?: readonly GrayImage[];
  /** Largest share of a stage's negatives taken from `negativePatches`, in [0, 1] (default DEFAULT_NEGATIVE_PATCH_SHARE). */
  readonly negativePatchShare?: number;
  /**
   * Augmented copies of every training positive (seeded shifts, scales, rotations, contrast
   * and brightness: augmentWindows with DEFAULT_AUGMENTATION), in [0, 100]; default 0.
   * Only the training side of the validation split is augmented, so stage thresholds are set
   * on real positives; copies of a training positive never reach validation.
   */
  readonly augmentCopies?: number;
  /**
   * Depth of every weak classifier, 1..3 (default 1: decision stumps); 2 and 3 boost small
   * decision trees (trainStage's weakDepth).
   */
  readonly weakDepth?: number;
  readonly pool?: BoostingPool;
  /** Stages finished by an earlier run (resume); training continues after them. */
  readonly completedStages?: readonly Stage[];
  readonly onEvent?: (event: TrainingEvent) => void;
  /** Called after every stage with all stages so far (write a checkpoint here). */
  readonly onStageFinished?: (stages: readonly Stage[], report: StageReport) => Promise<void>;
  /**
   * Polled between units of work; when true, training stops after the last finished
   * stage and returns with stop reason `interrupted` (the stage in progress is dropped).
   */
  readonly shouldStop?: () => boolean;
  /**
   * Stop when a stage uses all `maxWeakClassifiers` without reaching
   * `stageFalsePositiveRate` (stop reason `stage-stalled`; the stage is kept). Default true:
   * later stages would cost as much and gain as little, since the same positives pin them.
   */
  readonly stopWhenStalled?: boolean;
}

/** What happened in one stage, for progress lines and the summary table. */
export interface StageReport {
  readonly stageIndex: number;
  readonly weakClassifiers: number;
  readonly detectionRate: number;
  readonly falsePositiveRate: number;
  /** Product of the false-positive rates of all stages so far (each at least 1/negatives, see resolvableRate). */
  readonly overallFalsePositiveRate: number;
  readonly negatives: number;
  /** How many of `negatives` came from the negative patches (the rest were mined from backgrounds). */
  readonly negativesFromPatches: number;
  readonly windowsScanned: number;
  readonly seconds: number;
  readonly stoppedBecause: NonNullable<Stage['training']>['stoppedBecause'];
  readonly featuresUsed: number;
  /**
   * Mining throughput of this stage: background windows the scan kernel evaluated per
   * second of mining, on the one thread that mines (so per core). Absent for stage 1
   * (uniform sampling evaluates no cascade) and for stages recorded by an earlier run.
   */
  readonly miningWindowsPerSecond?: number;
  /** Where this stage's time went, in seconds (absent for stages recorded by an earlier run). */
  readonly phaseSeconds?: { readonly mining: number; readonly responseTable: number; readonly boosting: number };
}

/** Progress of training, for a live progress line. */
export type TrainingEvent =
  | { readonly phase: 'mining'; readonly stageIndex: number; readonly found: number; readonly wanted: number; readonly scanned: number }
  | { readonly phase: 'responses'; readonly stageIndex: number; readonly features: number; readonly samples: number }
  | { readonly phase: 'boosting'; readonly stageIndex: number; readonly weakClassifiers: number; readonly detectionRate: number; readonly falsePositiveRate: number }
  | { readonly phase: 'stage-finished'; readonly report: StageReport }
  /** Something the user should know before a long run (e.g. a validation set too small for the detection target). */
  | { readonly phase: 'warning'; readonly message: string };

/** Why training ended. */
export type CascadeStopReason =
  | 'target-reached'
  | 'max-stages'
  | 'backgrounds-exhausted'
  | 'positives-exhausted'
  | 'stage-not-improving'
  | 'stage-stalled'
  | 'interrupted';

export interface CascadeTrainingResult {
  readonly stages: Stage[];
  readonly stopReason: CascadeStopReason;
  /** One sentence for the summary line. */
  readonly stopMessage: string;
  readonly reports: StageReport[];
  readonly trainingPositives: number;
  readonly validationPositives: number;
  /** Mean of all positive windows (row-major, 0..255), for drawings. */
  readonly meanPositive: number[];
}

/** Fewest negatives worth training a stage on: half of those asked for. */
const MIN_NEGATIVE_SHARE = 0.5;

/**
 * Default largest share of a stage's negatives taken from negative patches: half. Up to half
 * keeps the backgrounds teaching what the patches do not show (the overall false-positive
 * target is about background windows), while a few hundred confusers still weigh as much as
 * all the easy windows together. A reasoned choice: the README's accuracy table measures it
 * against no patches, not yet against other shares.
 */
export const DEFAULT_NEGATIVE_PATCH_SHARE = 0.5;

/**
 * Trains a cascade (Viola & Jones 2001 §5, Table 2): stage after stage, each
 * boosted until it keeps `stageDetectionRate` of the validation positives while
 * letting through at most `stageFalsePositiveRate` of its negatives. Stage 1's
 * negatives are drawn uniformly from all background windows; every later stage's
 * are background windows that the cascade so far still accepts, beside the given
 * negative patches it still accepts (see `negativePatches`). Training stops
 * when the product of stage rates reaches the target, at `maxStages`, or when the
 * backgrounds cannot supply enough windows that the cascade accepts and no negative
 * patch is still accepted (success: the data can show no more).
 *
 * It also stops, keeping what it has, when a stage stalls (see `stopWhenStalled`) and
 * when `shouldStop()` turns true (stop reason `interrupted`: the finished stages are
 * returned, the stage in progress is dropped).
 *
 * Deterministic: every random choice comes from seedrandom(`seed:…`) streams named
 * by their purpose and stage, so a resumed run gives the same stages as an
 * uninterrupted one.
 * @throws RectboostError `invalid-option` for out-of-range options, `bad-data`
 *   for too few positives.
 */
export async function trainCascade(options: CascadeTrainingOptions): Promise<CascadeTrainingResult> {
  const { windowWidth, windowHeight } = options;
  checkNumber('stage detection rate', options.stageDetectionRate, 0.5, 1);
  checkOpenInterval('stage false-positive rate', options.stageFalsePositiveRate, 0, 1);
  checkOpenInterval('target false-positive rate', options.targetFalsePositiveRate, 0, 1);
  checkInteger('maximum stages', options.maxStages, 1, 1000);
  checkInteger('maximum weak classifiers', options.maxWeakClassifiers, 1, 10_000);
  checkInteger('negatives per stage', options.negativesPerStage, 1, 10_000_000);
  checkNumber('validation share', options.validationShare, 0, 0.9);
  const patchShare = checkNumber('negative patch share', options.negativePatchShare ?? DEFAULT_NEGATIVE_PATCH_SHARE, 0, 1);
  const negativePatches = options.negativePatches ?? [];
  checkThat(
    negativePatches.every((patch) => patch.width === windowWidth && patch.height === windowHeight),
    `Negative patches must be ${windowWidth}×${windowHeight} windows; resize them to the window first (loadPositiveWindows does).`,
  );
  checkThat(options.backgrounds.length > 0, 'Training needs at least one background image.');

  const { training, validation } = splitPositives(options);
  if (training.length < 2) {
    throw new RectboostError('bad-data', `Training needs at least 2 training positives after holding out validation; it has ${training.length}.`);
  }
  const featureSet = checkOneOf('feature set', options.featureSet ?? 'basic', FEATURE_SET_NAMES);
  const features = enumerateFeatures(windowWidth, windowHeight, FEATURE_SET_KINDS[featureSet]);
  const tables = { rotated: featuresNeedRotatedTable(features) };
  const backgrounds = new BackgroundWindows(options.backgrounds, windowWidth, windowHeight, undefined, tables);
  const stages: Stage[] = [...(options.completedStages ?? [])];
  const reports: StageReport[] = stages.map((stage, stageIndex) => reportOfRecordedStage(stage, stageIndex, stages));
  // One response table for the whole run, sized for the largest stage (every training
  // positive plus a full set of negatives) and reused by each stage, so peak memory
  // does not grow with the number of stages; --memory caps it.
  let buffers: StageBuffers | undefined;
  const runBuffers = (): StageBuffers =>
    (buffers ??= stageBuffersForRun(features, windowWidth, windowHeight, training.length + options.negativesPerStage, options.memoryBytes, options.pool !== undefined));
  const stop = (): void => {
    if (options.shouldStop?.()) throw new RectboostError('interrupted', 'Training was interrupted.');
  };
  const validationCount = validation.length === 0 ? training.length : validation.length;
  const allKept = keepsEveryValidationPositive(validationCount, options.stageDetectionRate);
  if (allKept !== undefined) options.onEvent?.({ phase: 'warning', message: allKept });
  const finish = (stopReason: CascadeStopReason, stopMessage: string): CascadeTrainingResult => ({
    stages,
    stopReason,
    stopMessage,
    reports,
    trainingPositives: training.length,
    validationPositives: validation.length,
    meanPositive: meanWindow([...training, ...validation], windowWidth * windowHeight),
  });

  try {
    return await trainStages();
  } catch (error) {
    if (isRectboostError(error, 'interrupted') && options.shouldStop?.() === true) {
      return finish('interrupted', `Interrupted after ${stages.length} finished stage${stages.length === 1 ? '' : 's'}.`);
    }
    throw error;
  }

  async function trainStages(): Promise<CascadeTrainingResult> {
    for (;;) {
      const overall = reports.reduce((product, report) => product * resolvableRate(report.falsePositiveRate, report.negatives), 1);
      if (stages.length > 0 && overall <= options.targetFalsePositiveRate) {
        return finish('target-reached', `Reached the target false-positive rate: ${formatRate(overall)} ≤ ${formatRate(options.targetFalsePositiveRate)} after ${stages.length} stages.`);
      }
      if (stages.length >= options.maxStages) {
        return finish('max-stages', `Stopped at the stage limit of ${options.maxStages}; overall false-positive rate ${formatRate(overall)}.`);
      }
      // Judged from the last stage's record, so that a run resumed right after it stops here too.
      const last = stages.at(-1)?.training;
      if (options.stopWhenStalled !== false && last?.stoppedBecause === 'max-weak-classifiers' && last.falsePositiveRate > options.stageFalsePositiveRate) {
        return finish('stage-stalled', stalledStageMessage(stages.length - 1, last.falsePositiveRate, validationCount, options));
      }
      stop();
      const stageIndex = stages.length;
      const started = performance.now();
      const cascadeSoFar = { window: { width: windowWidth, height: windowHeight }, stages };
      const trainingKept = keepAccepted(training, cascadeSoFar, windowWidth, windowHeight);
      const validationKept = validation.length === 0 ? trainingKept : keepAccepted(validation, cascadeSoFar, windowWidth, windowHeight);
      if (trainingKept.length < 2 || validationKept.length < 1) {
        return finish('positives-exhausted', `Stopped: the cascade keeps too few positives (${trainingKept.length}) to train stage ${stageIndex + 1}.`);
      }

      const miningStart = performance.now();
      const miningRandom = seedrandom(`${options.seed}:mining:${stageIndex}`);
      const wanted = options.negativesPerStage;
      const onMining = (found: number, scanned: number): void => options.onEvent?.({ phase: 'mining', stageIndex, found, wanted, scanned });
      const fromPatches = stillAcceptedPatches(negativePatches, cascadeSoFar, Math.floor(wanted * patchShare), seedrandom(`${options.seed}:patches:${stageIndex}`));
      const backgroundWanted = wanted - fromPatches.length;
      const mined = stageIndex === 0
        ? sampleUniformNegatives(backgrounds, backgroundWanted, miningRandom)
        : mineHardNegatives(backgrounds, cascadeSoFar, backgroundWanted, miningRandom, onMining, options.shouldStop);
      const miningSeconds = (performance.now() - miningStart) / 1000;
      stop();
      onMining(mined.negatives.length, mined.windowsScanned);
      const negatives = [...fromPatches, ...mined.negatives];
      // Negative patches the cascade still accepts are worth a stage of their own even when the
      // backgrounds run dry: they are the errors the user asked to remove.
      if (fromPatches.length === 0 && negatives.length < Math.max(1, Math.ceil(wanted * MIN_NEGATIVE_SHARE))) {
        return finish(
          'backgrounds-exhausted',
          `Stopped: the backgrounds hold only ${mined.negatives.length} windows that the ${stageIndex}-stage cascade still accepts ` +
            `(${mined.windowsScanned} scanned, ${backgroundWanted} wanted); the cascade has met what these backgrounds can show.`,
        );
      }

      options.onEvent?.({ phase: 'responses', stageIndex, features: features.length, samples: trainingKept.length + negatives.length });
      const result = await trainStage({
        features,
        positives: packWindowSamples(trainingKept, windowWidth, windowHeight, undefined, tables),
        negatives: packWindowSamples(negatives, windowWidth, windowHeight, undefined, tables),
        leadingNegatives: fromPatches.length,
        validationPositives: packWindowSamples(validationKept, windowWidth, windowHeight, undefined, tables),
        booster: options.booster,
        ...(options.weakDepth === undefined ? {} : { weakDepth: options.weakDepth }),
        minDetectionRate: options.stageDetectionRate,
        maxFalsePositiveRate: options.stageFalsePositiveRate,
        maxWeakClassifiers: options.maxWeakClassifiers,
        memoryBytes: options.memoryBytes,
        buffers: runBuffers(),
        random: seedrandom(`${options.seed}:features:${stageIndex}`),
        ...(options.pool === undefined ? {} : { pool: options.pool }),
        onRound: (round) => {
          stop();
          options.onEvent?.({
            phase: 'boosting',
            stageIndex,
            weakClassifiers: round.weakClassifiers,
            detectionRate: round.detectionRate,
            falsePositiveRate: round.falsePositiveRate,
          });
        },
      });
      if (result.falsePositiveRate >= 1) {
        // A stage that lets every negative through would only slow detection down; more of the
        // same data cannot fix it, so stop and say what would.
        return finish(
          'stage-not-improving',
          `Stopped: stage ${stageIndex + 1} could not reject any negative while keeping ${options.stageDetectionRate} of the validation positives ` +
            `(boosting ended with ${result.stoppedBecause}); add more varied positives, or lower --stage-detection.`,
        );
      }
      const stage: Stage = {
        threshold: result.stage.threshold,
        weakClassifiers: result.stage.weakClassifiers,
        training: {
          detectionRate: result.detectionRate,
          falsePositiveRate: result.falsePositiveRate,
          positives: trainingKept.length,
          negatives: negatives.length,
          negativesFromPatches: fromPatches.length,
          windowsScanned: mined.windowsScanned,
          featuresUsed: result.featuresUsed,
          stoppedBecause: result.stoppedBecause,
        },
      };
      stages.push(stage);
      const throughput = mined.windowsEvaluated !== undefined && mined.evaluationSeconds !== undefined && mined.evaluationSeconds > 0
        ? { miningWindowsPerSecond: mined.windowsEvaluated / mined.evaluationSeconds } : {};
      const report: StageReport = {
        ...reportOfRecordedStage(stage, stageIndex, stages),
        seconds: (performance.now() - started) / 1000,
        ...throughput,
        phaseSeconds: { mining: miningSeconds, responseTable: result.matrixSeconds, boosting: result.boostingSeconds },
      };
      reports.push(report);
      await options.onStageFinished?.(stages, report);
      options.onEvent?.({ phase: 'stage-finished', report });
    }
  }
}

/**
 * Why a stage that used every weak classifier it may have still lets too many negatives
 * through, and what to do, in two sentences. The usual cause on small data: with n
 * validation positives, a detection target d with ⌈d·n⌉ = n keeps every one of them, so
 * the single hardest positive sets the threshold of every stage.
 */
function stalledStageMessage(stageIndex: number, falsePositiveRate: number, validationCount: number, options: CascadeTrainingOptions): string {
  const head =
    `Stopped: stage ${stageIndex + 1} used all ${options.maxWeakClassifiers} weak classifiers and still lets ${(100 * falsePositiveRate).toFixed(1)}% ` +
    `of its negatives through (target ${(100 * options.stageFalsePositiveRate).toFixed(1)}%), so more stages would cost as much and gain as little.`;
  const cause = keepsEveryValidationPositive(validationCount, options.stageDetectionRate) !== undefined
    ? ` The likely cause: with ${validationCount} validation positives, a stage detection rate of ${options.stageDetectionRate} means keeping all ${validationCount}, so the hardest one sets every threshold.`
    : ' The positives and the background windows that still pass look too alike for this many weak classifiers.';
  return (
    `${head}${cause} Remedies: more (and more varied) positives, a lower --stage-detection, a larger --validation share, or a higher --max-weak; ` +
    '--keep-going trains on regardless. The stages so far are saved.'
  );
}

/**
 * A warning when a detection target leaves no room for misses on `validationCount`
 * positives (⌈d·n⌉ = n, the rule of thresholdForDetectionRate), or undefined when it does.
 * d = 1 asks for every positive on purpose, so it is not warned about.
 */
function keepsEveryValidationPositive(validationCount: number, stageDetectionRate: number): string | undefined {
  if (stageDetectionRate >= 1 || Math.ceil(stageDetectionRate * validationCount - 1e-9) < validationCount) return undefined;
  const needed = Math.ceil(1 / (1 - stageDetectionRate) - 1e-9);
  return (
    `Only ${validationCount} validation positives: a stage detection rate of ${stageDetectionRate} means keeping every one of them, ` +
    `so one unusual positive sets every stage threshold. Use at least ${needed} validation positives (more positives or a larger --validation share), ` +
    'or a lower --stage-detection.'
  );
}

function reportOfRecordedStage(stage: Stage, stageIndex: number, stages: readonly Stage[]): StageReport {
  const record = stage.training;
  let overall = 1;
  for (let k = 0; k <= stageIndex; k++) {
    const training = stages[k]?.training;
    overall *= training === undefined ? 1 : resolvableRate(training.falsePositiveRate, training.negatives);
  }
  return {
    stageIndex,
    weakClassifiers: stage.weakClassifiers.length,
    detectionRate: record?.detectionRate ?? NaN,
    falsePositiveRate: record?.falsePositiveRate ?? 1,
    overallFalsePositiveRate: overall,
    negatives: record?.negatives ?? 0,
    negativesFromPatches: record?.negativesFromPatches ?? 0,
    windowsScanned: record?.windowsScanned ?? 0,
    seconds: 0,
    stoppedBecause: record?.stoppedBecause ?? 'targets-met',
    featuresUsed: record?.featuresUsed ?? 0,
  };
}

/**
 * A stage's false-positive rate as far as its negatives can show it: N negatives
 * cannot measure a rate below 1/N, so a stage that rejected all of them counts as
 * 1/N in the overall product. Without this floor one stage that happens to reject
 * its few training negatives would end training at once.
 */
export function resolvableRate(rate: number, negatives: number): number {
  return Math.max(rate, 1 / Math.max(1, negatives));
}

/** Positives held out for validation: round(count · share), at least 1 unless share is 0. */
export function heldOutCount(count: number, validationShare: number): number {
  return validationShare === 0 ? 0 : Math.max(1, Math.round(count * validationShare));
}

/**
 * Seeded split of positives into training and validation; mirrored copies follow their
 * source, and augmented copies (of training positives and their mirror images) stay in training.
 */
function splitPositives(options: CascadeTrainingOptions): { training: GrayImage[]; validation: GrayImage[] } {
  const count = options.positives.length;
  const order = Array.from({ length: count }, (_, i) => i);
  const random = seedrandom(`${options.seed}:validation`);
  for (let i = count - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    [order[i], order[j]] = [order[j]!, order[i]!];
  }
  const held = heldOutCount(count, options.validationShare);
  const expand = (indices: number[]): GrayImage[] => {
    const originals = indices.map((i) => options.positives[i]!);
    return options.mirror ? [...originals, ...originals.map(mirrorGrayImage)] : originals;
  };
  const training = expand(order.slice(held));
  const augmented = augmentWindows(training, options.augmentCopies ?? 0, seedrandom(`${options.seed}:augment`));
  return { validation: expand(order.slice(0, held)), training: [...training, ...augmented] };
}

/**
 * The negative patches that the cascade so far still accepts (all of them before stage 1),
 * at most `limit`: when more are accepted, a seeded sample of `limit` in their input order.
 */
function stillAcceptedPatches(patches: readonly GrayImage[], cascade: CascadeSoFar, limit: number, random: () => number): GrayImage[] {
  if (patches.length === 0 || limit <= 0) return [];
  const accepted = keepAccepted(patches, cascade, cascade.window.width, cascade.window.height);
  if (accepted.length <= limit) return accepted;
  // Partial Fisher–Yates over indices, then input order, so the sample does not depend on accepted order quirks.
  const indices = Array.from({ length: accepted.length }, (_, i) => i);
  for (let i = 0; i < limit; i++) {
    const j = i + Math.floor(random() * (indices.length - i));
    [indices[i], indices[j]] = [indices[j]!, indices[i]!];
  }
  return indices.slice(0, limit).sort((a, b) => a - b).map((i) => accepted[i]!);
}

type CascadeSoFar = { stages: readonly Stage[]; window: { width: number; height: number } };

/** The windows the cascade so far accepts (scan kernel; flat windows never, as in detection). */
function keepAccepted(windows: readonly GrayImage[], cascade: CascadeSoFar, width: number, height: number): GrayImage[] {
  const detector = detectorCascadeFromModel(cascade);
  const accepted = acceptSamples(detector, packWindowSamples(windows, width, height, undefined, { rotated: cascadeUsesTiltedFeatures(detector) }));
  return windows.filter((_, i) => accepted[i] === 1);
}

function meanWindow(windows: readonly GrayImage[], size: number): number[] {
  const mean = new Float64Array(size);
  for (const window of windows) for (let i = 0; i < size; i++) mean[i]! += window.data[i]!;
  return Array.from(mean, (total) => total / Math.max(1, windows.length));
}

/** A rate for messages: 3 significant digits, exponent below 0.001. */
export function formatRate(rate: number): string {
  return rate !== 0 && rate < 1e-3 ? rate.toExponential(2) : rate.toPrecision(3);
}
