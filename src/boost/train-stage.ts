import { checkInteger, checkNumber, checkOneOf, checkOpenInterval, checkThat } from '../check.js';
import { MAX_TREE_DEPTH, weakClassifierFromTree, type Stage, type StageTrainingRecord, type TreeLeaf, type TreeSplit, type WeakClassifier } from '../model/cascade-model.js';
import { detectorWeakClassifier } from '../detect/detector-cascade.js';
import { stageSampleScores } from '../detect/window-list.js';
import { compileFeatures } from '../features/compiled-features.js';
import type { HaarFeature } from '../features/haar-feature.js';
import type { WindowSamples } from '../features/window-samples.js';
import type { BoostingPool } from './boosting-pool-contract.js';
import { decideRound, stumpOutputs } from './adaboost.js';
import { BOOSTER_KINDS, initialWeights, updateWeights, type BoosterKind } from './booster.js';
import { createSplitScratch, searchBestSplit, type SplitCandidate, type SplitRule } from './best-split.js';
import { fillResponseRows, splitValueOf, type ResponseMatrix } from './response-matrix.js';
import { packSampleColumns } from './sample-columns.js';
import { createStageBuffers, DEFAULT_MATRIX_MEMORY_BYTES, placeCompiledFeatures, type StageBuffers } from './stage-buffers.js';
import { passRate, thresholdForDetectionRate } from './stage-threshold.js';
import { decideTreeRound, growTree, mapMatrixTree, treeOutputs } from './tree-round.js';

export { DEFAULT_MATRIX_MEMORY_BYTES };

/** What trainStage reports after each weak classifier it adds. */
export interface StageRoundReport {
  /** Weak classifiers in the stage so far, ≥ 1. */
  readonly weakClassifiers: number;
  /** Stage threshold set for minDetectionRate on the validation positives. */
  readonly threshold: number;
  /** Share of validation positives at or above the threshold. */
  readonly detectionRate: number;
  /** Share of training negatives at or above the threshold. */
  readonly falsePositiveRate: number;
  /** Time since the round's split search began. */
  readonly milliseconds: number;
}

/** Inputs of trainStage (ranges are checked once, up front). */
export interface StageTrainingOptions {
  /** Candidate features, e.g. enumerateFeatures(24, 24); at least one. */
  readonly features: readonly HaarFeature[];
  /** Training positives; at least one. */
  readonly positives: WindowSamples;
  /** Training negatives; at least one. */
  readonly negatives: WindowSamples;
  /** Held-out positives that set the stage threshold (may be `positives` again). */
  readonly validationPositives: WindowSamples;
  readonly booster: BoosterKind;
  /** In (0, 1], e.g. 0.995. */
  readonly minDetectionRate: number;
  /** In (0, 1), e.g. 0.5. */
  readonly maxFalsePositiveRate: number;
  /** 1..10000, e.g. 200. */
  readonly maxWeakClassifiers: number;
  /** Worker pool; when absent, everything runs in this thread. */
  readonly pool?: BoostingPool;
  /** Cap for the response matrix in bytes; default and maximum DEFAULT_MATRIX_MEMORY_BYTES. */
  readonly memoryBytes?: number;
  /** Seeded generator in [0, 1); used only to sample features when the matrix would not fit. */
  readonly random: () => number;
  /** Called after each weak classifier is added. */
  readonly onRound?: (round: StageRoundReport) => void;
  /**
   * When set, the first `leadingNegatives` negatives (e.g. negative patches) form a group of
   * their own: the stage is done only when at most maxFalsePositiveRate of that group and at most
   * maxFalsePositiveRate of the other negatives pass, so that a few hard negatives cannot be
   * outvoted by many easy ones. Default 0 (one group). The reported falsePositiveRate stays the
   * share of all negatives that pass.
   */
  readonly leadingNegatives?: number;
  /** Initial weights: `balanced` (default, Viola & Jones 2001 Table 1) or `uniform`. */
  readonly initialWeights?: 'balanced' | 'uniform';
  /**
   * Depth of each weak classifier, 1..MAX_TREE_DEPTH: 1 (default) boosts decision stumps,
   * 2 and 3 small decision trees (growTree; Lienhart, Kuranov & Pisarevsky 2003 found
   * small CART trees better than stumps for Haar-like cascades). Gentle AdaBoost grows
   * the weighted least-squares regression tree, Discrete AdaBoost the weighted Gini
   * classification tree whose leaves vote ±α (booster.ts).
   */
  readonly weakDepth?: number;
  /**
   * Memory to work in, shared by every stage of a run (see StageBuffers); shared
   * buffers when a pool is given. When absent, the stage allocates its own.
   */
  readonly buffers?: StageBuffers;
}

/** What trainStage produced and measured. */
export interface StageTrainingResult {
  /** Threshold and weak classifiers; `training` is left for the cascade builder. */
  readonly stage: Stage;
  /** On validationPositives, at the threshold. */
  readonly detectionRate: number;
  /** On negatives, at the threshold. */
  readonly falsePositiveRate: number;
  readonly stoppedBecause: StageTrainingRecord['stoppedBecause'];
  /** Features in the response matrix: features.length unless the memory cap forced a sample. */
  readonly featuresUsed: number;
  readonly matrixSeconds: number;
  readonly boostingSeconds: number;
}

/**
 * Trains one cascade stage (Viola & Jones 2001 §4, Table 2's inner loop):
 * boost weak classifiers (one thresholded Haar-like feature each) until, with the
 * stage threshold lowered to keep minDetectionRate on the validation positives,
 * at most maxFalsePositiveRate of the negatives pass — or maxWeakClassifiers is hit,
 * or boosting cannot go on (a perfect or no-better-than-chance round).
 *
 * Steps: the response matrix of every feature on positives then negatives is built
 * once (DESIGN.md §4); each round finds the best split over it (in the pool's workers
 * when a pool is given), turns it into outputs (booster.ts, adaboost.ts), adds the
 * outputs to running stage scores — no rescoring — and re-weights.
 *
 * Memory fallback: when features × samples bytes exceed memoryBytes, the stage uses
 * ⌊memoryBytes / samples⌋ features drawn with `random` (a partial Fisher–Yates shuffle,
 * then sorted back into enumeration order), and says so in `featuresUsed`.
 *
 * Determinism: same inputs and random ⇒ the same stage for any pool size.
 * This is the one asynchronous function of the boosting core, because the pool's
 * workers answer asynchronously; it does no I/O of its own.
 * @throws RectboostError `invalid-option` for options out of range, windows that differ,
 *   or a memory cap too small for even one feature.
 * @example
 * const { stage } = await trainStage({ features: enumerateFeatures(24, 24), positives, negatives,
 *   validationPositives: positives, booster: 'gentle', minDetectionRate: 0.995,
 *   maxFalsePositiveRate: 0.5, maxWeakClassifiers: 200, random: seedrandom('1') });
 */
export async function trainStage(options: StageTrainingOptions): Promise<StageTrainingResult> {
  const { features, positives, negatives, validationPositives, pool } = options;
  const booster = checkOneOf('booster', options.booster, BOOSTER_KINDS);
  const minDetectionRate = checkNumber('minimum stage detection rate', options.minDetectionRate, Number.MIN_VALUE, 1);
  const maxFalsePositiveRate = checkOpenInterval('maximum stage false-positive rate', options.maxFalsePositiveRate, 0, 1);
  const maxWeakClassifiers = checkInteger('maximum weak classifiers per stage', options.maxWeakClassifiers, 1, 10_000);
  const weakDepth = checkInteger('weak classifier depth', options.weakDepth ?? 1, 1, MAX_TREE_DEPTH);
  const memoryBytes = Math.min(
    checkNumber('response matrix memory cap (bytes)', options.memoryBytes ?? DEFAULT_MATRIX_MEMORY_BYTES, 1, Number.MAX_SAFE_INTEGER),
    DEFAULT_MATRIX_MEMORY_BYTES,
  );
  checkThat(features.length >= 1, 'A stage needs at least one candidate feature; received none.');
  checkThat(positives.count >= 1 && negatives.count >= 1 && validationPositives.count >= 1,
    `A stage needs positives, negatives and validation positives; received ${positives.count}, ${negatives.count} and ${validationPositives.count}.`);
  for (const [name, set] of [['negatives', negatives], ['validation positives', validationPositives]] as const) {
    checkThat(set.windowWidth === positives.windowWidth && set.windowHeight === positives.windowHeight,
      `The ${name} are ${set.windowWidth}×${set.windowHeight} windows but the positives are ${positives.windowWidth}×${positives.windowHeight}; all sets must use one window.`);
  }

  const sampleCount = positives.count + negatives.count;
  const leading = checkInteger('leading negatives', options.leadingNegatives ?? 0, 0, negatives.count);
  const positiveCount = positives.count;
  const chosen = chooseFeatures(features.length, sampleCount, memoryBytes, options.random);
  const featureCount = chosen.length;
  const stageFeatures = chosen.map((index) => features[index]!);

  // --- Response matrix -------------------------------------------------------
  const matrixStart = performance.now();
  checkThat(negatives.rotatedAt === positives.rotatedAt && validationPositives.rotatedAt === positives.rotatedAt,
    'Positives, negatives and validation positives must be packed alike (all with the rotated tables or none).');
  const compiledAll = compileFeatures(stageFeatures, positives.windowWidth + 1, positives.rotatedAt);
  const buffers = options.buffers ?? createStageBuffers({
    featureCount,
    cornerCount: compiledAll.offsets.length,
    sampleCount,
    tableSize: positives.tableSize,
    memoryBytes: featureCount * sampleCount,
    shared: pool !== undefined,
  });
  checkThat(pool === undefined || buffers.bins.buffer instanceof SharedArrayBuffer,
    'Stage buffers given with a worker pool must be shared; create them with `shared: true`.');
  checkThat(featureCount * sampleCount <= buffers.tableBytes && sampleCount <= buffers.limits.sampleCount,
    `A response table of ${featureCount} features × ${sampleCount} samples does not fit the run's table of ${buffers.tableBytes} bytes for ${buffers.limits.sampleCount} samples.`);
  const samples = packSampleColumns(positives, negatives, buffers);
  const compiled = placeCompiledFeatures(buffers, compiledAll);
  const matrix: ResponseMatrix = {
    featureCount,
    sampleCount,
    positiveCount,
    bins: buffers.bins.subarray(0, featureCount * sampleCount),
    minimums: buffers.minimums.subarray(0, featureCount),
    binWidths: buffers.binWidths.subarray(0, featureCount),
  };
  if (pool === undefined) {
    fillResponseRows(samples, compiled, 0, featureCount, matrix);
  } else {
    await pool.buildMatrix({ ...samples, ...compiled, bins: matrix.bins, minimums: matrix.minimums, binWidths: matrix.binWidths }, featureCount);
  }
  const matrixSeconds = (performance.now() - matrixStart) / 1000;

  // --- Boosting --------------------------------------------------------------
  const boostingStart = performance.now();
  const weights = buffers.weights.subarray(0, sampleCount);
  weights.set(initialWeights(positiveCount, negatives.count, options.initialWeights ?? 'balanced'));
  const scratch = createSplitScratch();
  const search = async (searchWeights: Float64Array, rule: SplitRule): Promise<SplitCandidate | null> =>
    pool === undefined
      ? searchBestSplit(matrix.bins, sampleCount, positiveCount, searchWeights, booster, 0, featureCount, scratch, rule)
      : pool.searchSplit({ bins: matrix.bins, featureCount, sampleCount, positiveCount, weights: searchWeights, booster, rule });
  const nodeWeights = buffers.nodeWeights.subarray(0, sampleCount);
  // One round: the weak classifier in model terms and its outputs on the training samples.
  const chooseWeak = async (): Promise<
    | { readonly kind: 'stop'; readonly reason: 'no-better-than-chance' }
    | { readonly kind: 'round' | 'last'; readonly weak: WeakClassifier; readonly outputs: Float64Array }
  > => {
    if (weakDepth === 1) {
      const outcome = decideRound(await search(weights, 'stump'), booster);
      if (outcome.kind === 'stop' && outcome.reason === 'no-better-than-chance') return outcome;
      const { stump } = outcome;
      const weak: WeakClassifier = {
        feature: stageFeatures[stump.feature]!,
        splitValue: splitValueOf(matrix, stump.feature, stump.bin),
        belowOutput: stump.belowOutput,
        aboveOutput: stump.aboveOutput,
      };
      return { kind: outcome.kind === 'stop' ? 'last' : 'round', weak, outputs: stumpOutputs(matrix, stump) };
    }
    const grown = await growTree(matrix, weights, nodeWeights, weakDepth, (searchWeights) => search(searchWeights, 'tree-node'));
    const outcome = decideTreeRound(grown, booster);
    if (outcome.kind === 'stop' && outcome.reason === 'no-better-than-chance') return outcome;
    const root = mapMatrixTree<TreeSplit, TreeLeaf>(
      outcome.tree.root,
      (feature, bin, below, above) => ({ feature: stageFeatures[feature]!, splitValue: splitValueOf(matrix, feature, bin), below, above }),
      (output) => ({ output }),
    ) as TreeSplit;
    return { kind: outcome.kind === 'stop' ? 'last' : 'round', weak: weakClassifierFromTree(root), outputs: treeOutputs(matrix, outcome.tree.root) };
  };

  const weakClassifiers: WeakClassifier[] = [];
  const negativeScores = new Float64Array(negatives.count);
  const validationScores = new Float64Array(validationPositives.count);
  let threshold = 0;
  let detectionRate = 1;
  let falsePositiveRate = 1;
  let stoppedBecause: StageTrainingRecord['stoppedBecause'] = 'max-weak-classifiers';

  while (weakClassifiers.length < maxWeakClassifiers) {
    const roundStart = performance.now();
    const outcome = await chooseWeak();
    if (outcome.kind === 'stop') {
      stoppedBecause = outcome.reason;
      break;
    }
    const { weak, outputs } = outcome;
    weakClassifiers.push(weak);

    // Running stage scores: the matrix bins decide "below" exactly as value < splitValue
    // does (response-bins.ts), and validation windows are scored on their real values by
    // the scan kernel, one classifier at a time; adding each output to a running sum from 0
    // is the kernel's own order, so these are the scores detection gives the same windows.
    // Flat validation windows score −∞: no cascade passes them.
    for (let i = 0; i < negatives.count; i++) negativeScores[i]! += outputs[positiveCount + i]!;
    const validationOutputs = stageSampleScores({ weakClassifiers: [detectorWeakClassifier(weak)] }, positives.windowWidth, positives.windowHeight, validationPositives);
    for (let i = 0; i < validationPositives.count; i++) validationScores[i]! += validationOutputs[i]!;
    threshold = thresholdForDetectionRate(validationScores, minDetectionRate);
    detectionRate = passRate(validationScores, threshold);
    falsePositiveRate = passRate(negativeScores, threshold);
    const targetMet = leading > 0 && leading < negatives.count
      ? passRate(negativeScores.subarray(0, leading), threshold) <= maxFalsePositiveRate && passRate(negativeScores.subarray(leading), threshold) <= maxFalsePositiveRate
      : falsePositiveRate <= maxFalsePositiveRate;
    options.onRound?.({ weakClassifiers: weakClassifiers.length, threshold, detectionRate, falsePositiveRate, milliseconds: performance.now() - roundStart });

    if (targetMet) {
      stoppedBecause = 'targets-met';
      break;
    }
    if (outcome.kind === 'last') {
      stoppedBecause = 'perfect-separation';
      break;
    }
    weights.set(updateWeights(weights, outputs, positiveCount));
  }

  return {
    stage: { threshold, weakClassifiers },
    detectionRate,
    falsePositiveRate,
    stoppedBecause,
    featuresUsed: featureCount,
    matrixSeconds,
    boostingSeconds: (performance.now() - boostingStart) / 1000,
  };
}

/** All feature indices, or a seeded sample of them that fits the memory cap, ascending. */
function chooseFeatures(featureCount: number, sampleCount: number, memoryBytes: number, random: () => number): number[] {
  const all = Array.from({ length: featureCount }, (_, index) => index);
  if (featureCount * sampleCount <= memoryBytes) return all;
  const fitting = Math.floor(memoryBytes / sampleCount);
  checkThat(fitting >= 1,
    `A response matrix for ${sampleCount} samples needs at least ${sampleCount} bytes per feature; the memory cap of ${memoryBytes} bytes holds none. Raise the memory cap or use fewer samples.`);
  for (let i = 0; i < fitting; i++) {
    const j = i + Math.floor(random() * (featureCount - i));
    const swap = all[i]!;
    all[i] = all[j]!;
    all[j] = swap;
  }
  return all.slice(0, fitting).sort((a, b) => a - b);
}
