import { boosterFormulas, type BoosterFormulas, type BoosterKind } from './booster.js';
import { BIN_COUNT } from './response-bins.js';
import { binWords, buildHistogramGroup, createSplitScratch, HISTOGRAM_GROUP, HISTOGRAM_NEGATIVES, HISTOGRAM_SLOT } from './split-histogram.js';

export { createSplitScratch } from './split-histogram.js';

/**
 * The best split of one feature, as plain data: samples in bins < `bin` go below, the
 * rest above. The four sums are the sample weight of each class on each side; `error` is
 * the booster's splitErrors there (DISCRETE_ADABOOST / GENTLE_ADABOOST in booster.ts).
 */
export interface SplitCandidate {
  readonly feature: number;
  readonly bin: number;
  readonly error: number;
  readonly belowPositive: number;
  readonly belowNegative: number;
  readonly abovePositive: number;
  readonly aboveNegative: number;
}

/**
 * Which criterion a split search minimizes: `stump` the booster's splitErrors (a weak
 * classifier of depth 1), `tree-node` its nodeSplitErrors (a node of a deeper tree).
 */
export type SplitRule = 'stump' | 'tree-node';

/**
 * Finds the best split over features featureStart..featureEnd−1 of a response
 * matrix, or null when no feature in the range has a split (all constant).
 *
 * Per group of HISTOGRAM_GROUP features: one pass over the weights builds their
 * weighted class histograms (buildHistogramGroup), then a cumulative scan over each
 * feature's 255 bin edges scores every split with the booster's splitErrors. Linear in
 * samples, no sort. The booster's formulas are looked up once here; they score all
 * edges of a feature in one call.
 * Exactness: a feature's histograms, and so its candidate, are bit for bit the same
 * whatever group or thread handles it; they depend only on its row and the weights.
 * Ties: within a feature the lowest bin wins, across features the lowest index
 * (strict < in ascending order), which makes the reduction over workers
 * (lowest error, then lowest feature index) identical to one sequential scan.
 * @example searchBestSplit(matrix.bins, matrix.sampleCount, matrix.positiveCount, weights, 'gentle', 0, matrix.featureCount)
 */
export function searchBestSplit(
  bins: Uint8Array,
  sampleCount: number,
  positiveCount: number,
  weights: Float64Array,
  booster: BoosterKind,
  featureStart: number,
  featureEnd: number,
  scratch: Float64Array = createSplitScratch(),
  rule: SplitRule = 'stump',
): SplitCandidate | null {
  const formulas = boosterFormulas(booster);
  const words = binWords(bins, sampleCount);
  let best: SplitCandidate | null = null;
  let bestError = Infinity;
  for (let f = featureStart; f < featureEnd; f += HISTOGRAM_GROUP) {
    const members = Math.min(HISTOGRAM_GROUP, featureEnd - f);
    buildHistogramGroup(bins, words, sampleCount, positiveCount, weights, f, members, scratch);
    for (let member = 0; member < members; member++) {
      const candidate = scanHistogram(scratch, member * HISTOGRAM_SLOT, f + member, formulas, rule);
      if (candidate !== null && candidate.error < bestError) {
        bestError = candidate.error;
        best = candidate;
      }
    }
  }
  return best;
}

// The candidate edges of the feature being scanned (at most 255), reused: this module is
// synchronous, so one set per thread suffices.
const EDGE_BINS = new Int32Array(BIN_COUNT);
const EDGE_POSITIVE_BELOW = new Float64Array(BIN_COUNT);
const EDGE_NEGATIVE_BELOW = new Float64Array(BIN_COUNT);
const EDGE_ERRORS = new Float64Array(BIN_COUNT);

/**
 * The split scan of one feature: reads its histograms (positives at slot + b,
 * negatives at slot + HISTOGRAM_NEGATIVES + b) and returns its lowest-error split
 * under `formulas` (splitErrors, or nodeSplitErrors for rule `tree-node`), or null when
 * all its weight sits in one bin.
 */
export function scanHistogram(h: Float64Array, slot: number, feature: number, formulas: BoosterFormulas, rule: SplitRule = 'stump'): SplitCandidate | null {
  // Module bindings copied to locals: read inside the loops they cost about 10 % of a
  // whole search (V8 reloads a module binding on every use).
  const negativeSlot = slot + HISTOGRAM_NEGATIVES;
  const binCount = BIN_COUNT;
  const edgeBins = EDGE_BINS, edgePositiveBelow = EDGE_POSITIVE_BELOW, edgeNegativeBelow = EDGE_NEGATIVE_BELOW, edgeErrors = EDGE_ERRORS;
  let positiveTotal = 0;
  let negativeTotal = 0;
  let lastBin = 0;
  for (let b = 0; b < binCount; b++) {
    const positive = h[slot + b]!;
    const negative = h[negativeSlot + b]!;
    positiveTotal += positive;
    negativeTotal += negative;
    if (positive !== 0 || negative !== 0) lastBin = b;
  }
  // Edges 1..lastBin leave weight on both sides; an empty bin before edge b repeats
  // the split of edge b − 1, so it is skipped. The cumulative sums of the others go to
  // the edge tables, the booster scores them all in one call, and the lowest error
  // wins (the first of equals, i.e. the lowest bin).
  let positiveBelow = 0;
  let negativeBelow = 0;
  let count = 0;
  for (let b = 1; b <= lastBin; b++) {
    const positive = h[slot + b - 1]!;
    const negative = h[negativeSlot + b - 1]!;
    if (positive === 0 && negative === 0) continue;
    positiveBelow += positive;
    negativeBelow += negative;
    edgeBins[count] = b;
    edgePositiveBelow[count] = positiveBelow;
    edgeNegativeBelow[count] = negativeBelow;
    count++;
  }
  if (count === 0) return null;
  if (rule === 'stump') formulas.splitErrors(edgePositiveBelow, edgeNegativeBelow, count, positiveTotal, negativeTotal, edgeErrors);
  else formulas.nodeSplitErrors(edgePositiveBelow, edgeNegativeBelow, count, positiveTotal, negativeTotal, edgeErrors);
  let best = 0;
  for (let k = 1; k < count; k++) if (edgeErrors[k]! < edgeErrors[best]!) best = k;
  const belowPositive = edgePositiveBelow[best]!;
  const belowNegative = edgeNegativeBelow[best]!;
  return {
    feature,
    bin: edgeBins[best]!,
    error: edgeErrors[best]!,
    belowPositive,
    belowNegative,
    abovePositive: positiveTotal - belowPositive,
    aboveNegative: negativeTotal - belowNegative,
  };
}

/** Picks the better of two candidates: lower error, then lower feature index. */
export function betterSplit(first: SplitCandidate | null, second: SplitCandidate | null): SplitCandidate | null {
  if (first === null) return second;
  if (second === null) return first;
  if (second.error < first.error || (second.error === first.error && second.feature < first.feature)) return second;
  return first;
}
