import { checkInteger } from '../check.js';
import { boosterFormulas, initialWeights, PERFECT_ERROR, updateWeights, type BoosterKind } from './booster.js';
import { createSplitScratch, searchBestSplit, type SplitCandidate } from './best-split.js';
import { splitValueOf, type ResponseMatrix } from './response-matrix.js';

/** A chosen stump in matrix terms: feature index, bin, and the two outputs. */
export interface ChosenStump {
  readonly feature: number;
  /** Samples in bins < bin go below (value < splitValue). */
  readonly bin: number;
  readonly belowOutput: number;
  readonly aboveOutput: number;
  /** Weighted misclassification error (discrete) or weighted squared error (gentle). */
  readonly weightedError: number;
  /** Discrete AdaBoost's α; for Gentle AdaBoost, 1 (its outputs are already scaled). */
  readonly alpha: number;
}

/**
 * What one boosting round decided (house style: a typed result, never nulls).
 * - `round`: add `stump` and keep boosting.
 * - `stop`/`perfect-separation`: `stump` classifies every training sample correctly
 *   (error ≤ PERFECT_ERROR); add it, but re-weighting would change nothing useful.
 * - `stop`/`no-better-than-chance`: no feature beats a constant; add nothing.
 */
export type RoundOutcome =
  | { readonly kind: 'round'; readonly stump: ChosenStump }
  | { readonly kind: 'stop'; readonly reason: 'perfect-separation'; readonly stump: ChosenStump }
  | { readonly kind: 'stop'; readonly reason: 'no-better-than-chance' };

/**
 * Turns the best split of a round into a weak classifier and decides whether boosting
 * goes on, with the booster's formulas (DISCRETE_ADABOOST, GENTLE_ADABOOST): its chance
 * test, then its side outputs and α. Weights are assumed to sum to 1.
 * @example decideRound(searchBestSplit(…, 'gentle', …), 'gentle')
 */
export function decideRound(candidate: SplitCandidate | null, booster: BoosterKind): RoundOutcome {
  if (candidate === null) return { kind: 'stop', reason: 'no-better-than-chance' };
  const formulas = boosterFormulas(booster);
  if (formulas.isNoBetterThanChance(candidate)) return { kind: 'stop', reason: 'no-better-than-chance' };
  const { belowOutput, aboveOutput, alpha } = formulas.sideOutputs(candidate);
  const error = candidate.error;
  const stump: ChosenStump = { feature: candidate.feature, bin: candidate.bin, belowOutput, aboveOutput, weightedError: error, alpha };
  return error <= PERFECT_ERROR ? { kind: 'stop', reason: 'perfect-separation', stump } : { kind: 'round', stump };
}

/** The stump's output on every training sample, from its matrix row (bins < bin → below). */
export function stumpOutputs(matrix: Pick<ResponseMatrix, 'bins' | 'sampleCount'>, stump: ChosenStump): Float64Array {
  const n = matrix.sampleCount;
  const outputs = new Float64Array(n);
  const row = stump.feature * n;
  for (let s = 0; s < n; s++) outputs[s] = matrix.bins[row + s]! < stump.bin ? stump.belowOutput : stump.aboveOutput;
  return outputs;
}

/** One round of boostRounds: the stump, its split value, and the weights it was chosen under. */
export interface BoostedRound {
  readonly stump: ChosenStump;
  readonly splitValue: number;
  readonly weightsBefore: Float64Array;
}

/** Options of boostRounds. */
export interface BoostRoundsOptions {
  readonly booster: BoosterKind;
  /** Upper bound on rounds, 1..100000. */
  readonly rounds: number;
  /** Initial weights: `balanced` (default; Viola & Jones 2001) or `uniform` (as scikit-learn). */
  readonly initialWeights?: 'balanced' | 'uniform';
}

/**
 * Plain AdaBoost over a response matrix in this thread: at most `rounds` rounds,
 * stopping early on a perfect or no-better-than-chance round (a perfect stump is
 * kept). For tests, small problems and tools; trainStage adds stage thresholds,
 * targets and workers on top of the same steps.
 * @throws RectboostError `invalid-option` for rounds outside 1..100000.
 * @example boostRounds(matrix, { booster: 'discrete', rounds: 10 }).rounds.length
 */
export function boostRounds(matrix: ResponseMatrix, options: BoostRoundsOptions): { rounds: BoostedRound[]; stoppedBecause: 'rounds-done' | 'perfect-separation' | 'no-better-than-chance' } {
  checkInteger('rounds', options.rounds, 1, 100_000);
  let weights = initialWeights(matrix.positiveCount, matrix.sampleCount - matrix.positiveCount, options.initialWeights ?? 'balanced');
  const scratch = createSplitScratch();
  const rounds: BoostedRound[] = [];
  for (let r = 0; r < options.rounds; r++) {
    const candidate = searchBestSplit(matrix.bins, matrix.sampleCount, matrix.positiveCount, weights, options.booster, 0, matrix.featureCount, scratch);
    const outcome = decideRound(candidate, options.booster);
    if (outcome.kind === 'stop' && outcome.reason === 'no-better-than-chance') return { rounds, stoppedBecause: outcome.reason };
    const { stump } = outcome;
    rounds.push({ stump, splitValue: splitValueOf(matrix, stump.feature, stump.bin), weightsBefore: weights });
    if (outcome.kind === 'stop') return { rounds, stoppedBecause: outcome.reason };
    weights = updateWeights(weights, stumpOutputs(matrix, stump), matrix.positiveCount);
  }
  return { rounds, stoppedBecause: 'rounds-done' };
}
