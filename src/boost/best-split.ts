import type { BoosterKind } from './booster.js';
import { BIN_COUNT } from './response-bins.js';

/**
 * The best split of one feature: samples in bins < `bin` go below, the rest above.
 * The four sums are the sample weight of each class on each side.
 * `error` is what the booster minimizes:
 * - discrete: weighted misclassification error min(P_below + N_above, N_below + P_above),
 *   the better of the two polarities (Viola & Jones 2001 Table 1, step 2);
 * - gentle: weighted squared error Σ w (y − c_side)² with c_side the weighted label
 *   mean of the side, i.e. W − Σ_side (P − N)²/(P + N) (Friedman, Hastie & Tibshirani
 *   2000, Algorithm 4, step 2a).
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

/** The histogram arrays one thread reuses across calls (4 interleaved copies × 2 classes). */
export function createSplitScratch(): Float64Array {
  return new Float64Array(8 * BIN_COUNT);
}

/**
 * Finds the best split over features featureStart..featureEnd−1 of a response
 * matrix, or null when no feature in the range has a split (all constant).
 *
 * Per feature: one pass over its row builds weighted histograms — positives first,
 * then negatives, so the class is known from the loop and no label is read — then a
 * cumulative scan over the 255 bin edges. Linear in samples, no sort.
 * Four histograms interleaved by sample index (s mod 4) keep consecutive updates of
 * the same bin from waiting on each other; they are summed in a fixed order, so
 * a feature's sums depend only on its row and the weights, never on which thread
 * or partition handles it.
 * Ties: within a feature the lowest bin wins, across features the lowest index
 * (strict < in ascending order), which makes the reduction over workers
 * (lowest error, then lowest feature index) identical to one sequential scan.
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
): SplitCandidate | null {
  const n = sampleCount;
  const h = scratch;
  const gentle = booster === 'gentle';
  let best: SplitCandidate | null = null;
  let bestError = Infinity;
  for (let f = featureStart; f < featureEnd; f++) {
    h.fill(0);
    const row = f * n;
    let s = 0;
    const positiveEnd = positiveCount - 3;
    for (; s < positiveEnd; s += 4) {
      h[bins[row + s]!]! += weights[s]!;
      h[256 + bins[row + s + 1]!]! += weights[s + 1]!;
      h[512 + bins[row + s + 2]!]! += weights[s + 2]!;
      h[768 + bins[row + s + 3]!]! += weights[s + 3]!;
    }
    for (; s < positiveCount; s++) h[bins[row + s]!]! += weights[s]!;
    const negativeEnd = n - 3;
    for (; s < negativeEnd; s += 4) {
      h[1024 + bins[row + s]!]! += weights[s]!;
      h[1280 + bins[row + s + 1]!]! += weights[s + 1]!;
      h[1536 + bins[row + s + 2]!]! += weights[s + 2]!;
      h[1792 + bins[row + s + 3]!]! += weights[s + 3]!;
    }
    for (; s < n; s++) h[1024 + bins[row + s]!]! += weights[s]!;

    // Fold the four copies into the first one of each class, and total them.
    let positiveTotal = 0;
    let negativeTotal = 0;
    let lastBin = 0;
    for (let b = 0; b < 256; b++) {
      const positive = h[b]! + h[256 + b]! + h[512 + b]! + h[768 + b]!;
      const negative = h[1024 + b]! + h[1280 + b]! + h[1536 + b]! + h[1792 + b]!;
      h[b] = positive;
      h[1024 + b] = negative;
      positiveTotal += positive;
      negativeTotal += negative;
      if (positive !== 0 || negative !== 0) lastBin = b;
    }
    const total = positiveTotal + negativeTotal;
    let positiveBelow = 0;
    let negativeBelow = 0;
    let featureError = Infinity;
    let featureBin = 0;
    // Edges 1..lastBin leave weight on both sides; an empty bin before edge b
    // repeats the split of edge b − 1, so it is skipped.
    for (let b = 1; b <= lastBin; b++) {
      const positive = h[b - 1]!;
      const negative = h[1024 + b - 1]!;
      if (positive === 0 && negative === 0) continue;
      positiveBelow += positive;
      negativeBelow += negative;
      let error: number;
      if (gentle) {
        const positiveAbove = positiveTotal - positiveBelow;
        const negativeAbove = negativeTotal - negativeBelow;
        const below = positiveBelow + negativeBelow;
        const above = positiveAbove + negativeAbove;
        const differenceBelow = positiveBelow - negativeBelow;
        const differenceAbove = positiveAbove - negativeAbove;
        error = total - (below > 0 ? (differenceBelow * differenceBelow) / below : 0) - (above > 0 ? (differenceAbove * differenceAbove) / above : 0);
      } else {
        const positivesAboveError = positiveBelow + (negativeTotal - negativeBelow);
        const positivesBelowError = negativeBelow + (positiveTotal - positiveBelow);
        error = positivesAboveError <= positivesBelowError ? positivesAboveError : positivesBelowError;
      }
      if (error < featureError) {
        featureError = error;
        featureBin = b;
      }
    }
    if (featureBin > 0 && featureError < bestError) {
      bestError = featureError;
      let positiveBelowAtBest = 0;
      let negativeBelowAtBest = 0;
      for (let b = 0; b < featureBin; b++) {
        positiveBelowAtBest += h[b]!;
        negativeBelowAtBest += h[1024 + b]!;
      }
      best = {
        feature: f,
        bin: featureBin,
        error: featureError,
        belowPositive: positiveBelowAtBest,
        belowNegative: negativeBelowAtBest,
        abovePositive: positiveTotal - positiveBelowAtBest,
        aboveNegative: negativeTotal - negativeBelowAtBest,
      };
    }
  }
  return best;
}

/** Picks the better of two candidates: lower error, then lower feature index. */
export function betterSplit(first: SplitCandidate | null, second: SplitCandidate | null): SplitCandidate | null {
  if (first === null) return second;
  if (second === null) return first;
  if (second.error < first.error || (second.error === first.error && second.feature < first.feature)) return second;
  return first;
}
