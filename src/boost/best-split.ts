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

/** The histogram arrays one thread reuses: 2 features × 2 classes × 2 interleaved copies × 256 bins. */
export function createSplitScratch(): Float64Array {
  return new Float64Array(8 * BIN_COUNT);
}

// Layout of one feature's histograms inside the scratch, from its slot start:
// positives copy 0, positives copy 1, negatives copy 0, negatives copy 1.
const POSITIVE_ODD = 256;
const NEGATIVE_EVEN = 512;
const NEGATIVE_ODD = 768;
const SLOT = 1024;

/**
 * Finds the best split over features featureStart..featureEnd−1 of a response
 * matrix, or null when no feature in the range has a split (all constant).
 *
 * Per feature: one pass over its row builds weighted histograms — positives first,
 * then negatives, so the class is known from the loop and no label is read — then a
 * cumulative scan over the 255 bin edges. Linear in samples, no sort.
 * Speed: features go two at a time, so each weight is loaded once for two rows, and
 * each feature's histogram has two copies (even and odd samples), so the four
 * read-modify-writes in flight never wait on each other. A lone last feature takes
 * the same path with its twin's work skipped; either way a feature's sums are added
 * in one fixed order, so they depend only on its row and the weights — never on the
 * partition or thread that handles it.
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
  const positivePairs = positiveCount - (positiveCount & 1);
  const negativePairs = positiveCount + ((n - positiveCount) & ~1);
  for (let f = featureStart; f < featureEnd; f += 2) {
    const twin = f + 1 < featureEnd;
    const first = f * n;
    // Without a twin, the second row reads the first again into the unused slot.
    const second = twin ? first + n : first;
    h.fill(0);
    let s = 0;
    for (; s < positivePairs; s += 2) {
      const even = weights[s]!;
      const odd = weights[s + 1]!;
      h[bins[first + s]!]! += even;
      h[POSITIVE_ODD + bins[first + s + 1]!]! += odd;
      h[SLOT + bins[second + s]!]! += even;
      h[SLOT + POSITIVE_ODD + bins[second + s + 1]!]! += odd;
    }
    if (s < positiveCount) {
      h[bins[first + s]!]! += weights[s]!;
      h[SLOT + bins[second + s]!]! += weights[s]!;
      s++;
    }
    for (; s < negativePairs; s += 2) {
      const even = weights[s]!;
      const odd = weights[s + 1]!;
      h[NEGATIVE_EVEN + bins[first + s]!]! += even;
      h[NEGATIVE_ODD + bins[first + s + 1]!]! += odd;
      h[SLOT + NEGATIVE_EVEN + bins[second + s]!]! += even;
      h[SLOT + NEGATIVE_ODD + bins[second + s + 1]!]! += odd;
    }
    if (s < n) {
      h[NEGATIVE_EVEN + bins[first + s]!]! += weights[s]!;
      h[SLOT + NEGATIVE_EVEN + bins[second + s]!]! += weights[s]!;
    }
    for (let member = 0; member < (twin ? 2 : 1); member++) {
      const candidate = scanHistograms(h, member * SLOT, f + member, gentle);
      if (candidate !== null && candidate.error < bestError) {
        bestError = candidate.error;
        best = candidate;
      }
    }
  }
  return best;
}

/**
 * Folds one feature's histogram copies (positives into slot + b, negatives into
 * slot + 512 + b) and scans the edges for its best split; null without a split.
 */
function scanHistograms(h: Float64Array, slot: number, feature: number, gentle: boolean): SplitCandidate | null {
  let positiveTotal = 0;
  let negativeTotal = 0;
  let lastBin = 0;
  for (let b = 0; b < 256; b++) {
    const positive = h[slot + b]! + h[slot + POSITIVE_ODD + b]!;
    const negative = h[slot + NEGATIVE_EVEN + b]! + h[slot + NEGATIVE_ODD + b]!;
    h[slot + b] = positive;
    h[slot + NEGATIVE_EVEN + b] = negative;
    positiveTotal += positive;
    negativeTotal += negative;
    if (positive !== 0 || negative !== 0) lastBin = b;
  }
  const total = positiveTotal + negativeTotal;
  let positiveBelow = 0;
  let negativeBelow = 0;
  let featureError = Infinity;
  let featureBin = 0;
  let positiveBelowAtBest = 0;
  let negativeBelowAtBest = 0;
  // Edges 1..lastBin leave weight on both sides; an empty bin before edge b
  // repeats the split of edge b − 1, so it is skipped.
  for (let b = 1; b <= lastBin; b++) {
    const positive = h[slot + b - 1]!;
    const negative = h[slot + NEGATIVE_EVEN + b - 1]!;
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
      positiveBelowAtBest = positiveBelow;
      negativeBelowAtBest = negativeBelow;
    }
  }
  if (featureBin === 0) return null;
  return {
    feature,
    bin: featureBin,
    error: featureError,
    belowPositive: positiveBelowAtBest,
    belowNegative: negativeBelowAtBest,
    abovePositive: positiveTotal - positiveBelowAtBest,
    aboveNegative: negativeTotal - negativeBelowAtBest,
  };
}

/** Picks the better of two candidates: lower error, then lower feature index. */
export function betterSplit(first: SplitCandidate | null, second: SplitCandidate | null): SplitCandidate | null {
  if (first === null) return second;
  if (second === null) return first;
  if (second.error < first.error || (second.error === first.error && second.feature < first.feature)) return second;
  return first;
}
