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

/** The histogram arrays one thread reuses: 4 features × 2 classes × 256 bins. */
export function createSplitScratch(): Float64Array {
  return new Float64Array(GROUP * SLOT);
}

/** Features whose histograms are built in one pass over the weights. */
const GROUP = 4;
// One feature's histograms inside the scratch, from its slot start: positives at
// slot + b, negatives at slot + NEGATIVES + b.
const NEGATIVES = 256;
const SLOT = 512;

/** True where a Uint32 read of four bins yields sample s in bits 8·(s mod 4) (little-endian). */
const LITTLE_ENDIAN = new Uint8Array(new Uint32Array([1]).buffer)[0] === 1;

/**
 * Finds the best split over features featureStart..featureEnd−1 of a response
 * matrix, or null when no feature in the range has a split (all constant).
 *
 * Per feature: one pass over its row builds weighted histograms — positives first,
 * then negatives, so the class is known from the loop and no label is read — then a
 * cumulative scan over the 255 bin edges. Linear in samples, no sort.
 * Speed (the training hot loop): features go four at a time, so each weight is
 * loaded once for four rows and the four histogram read-modify-writes in flight
 * belong to different features and never wait on each other. When rows start on
 * 4-byte boundaries (sampleCount a multiple of 4 and `bins` 4-byte aligned) the
 * bins are read as one 32-bit word per four samples, which cuts loads by four.
 * Exactness: whatever path or grouping handles a feature, its histograms receive
 * the weights in sample order, so its sums — and its candidate — are bit for bit
 * the same; they depend only on its row and the weights, never on the partition
 * or thread. A last group of fewer than four re-reads its first row into the
 * unused slots and ignores them.
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
  const gentle = booster === 'gentle';
  const words = LITTLE_ENDIAN && n % 4 === 0 && bins.byteOffset % 4 === 0
    ? new Uint32Array(bins.buffer, bins.byteOffset, bins.length >>> 2)
    : null;
  let best: SplitCandidate | null = null;
  let bestError = Infinity;
  for (let f = featureStart; f < featureEnd; f += GROUP) {
    const members = Math.min(GROUP, featureEnd - f);
    const row0 = f * n;
    const row1 = members > 1 ? row0 + n : row0;
    const row2 = members > 2 ? row0 + 2 * n : row0;
    const row3 = members > 3 ? row0 + 3 * n : row0;
    scratch.fill(0);
    if (words === null) {
      accumulateBytes(bins, weights, 0, n, positiveCount, row0, row1, row2, row3, scratch);
    } else {
      // Whole words of positives, the word shared by both classes (if any) byte by
      // byte, then whole words of negatives: every sample in order.
      const positiveWords = positiveCount >>> 2;
      const negativeWords = (positiveCount + 3) >>> 2;
      const word0 = row0 >>> 2, word1 = row1 >>> 2, word2 = row2 >>> 2, word3 = row3 >>> 2;
      accumulateWords(words, weights, 0, positiveWords, 0, word0, word1, word2, word3, scratch);
      accumulateBytes(bins, weights, positiveWords << 2, negativeWords << 2, positiveCount, row0, row1, row2, row3, scratch);
      accumulateWords(words, weights, negativeWords, n >>> 2, NEGATIVES, word0, word1, word2, word3, scratch);
    }
    for (let member = 0; member < members; member++) {
      const candidate = scanHistograms(scratch, member * SLOT, f + member, gentle);
      if (candidate !== null && candidate.error < bestError) {
        bestError = candidate.error;
        best = candidate;
      }
    }
  }
  return best;
}

/**
 * Adds weights of samples from..to−1 of four rows (byte offsets row0..row3) into
 * the four slots, one sample at a time in sample order; positives (s < positiveCount)
 * into the positive half.
 */
function accumulateBytes(
  bins: Uint8Array, weights: Float64Array, from: number, to: number, positiveCount: number,
  row0: number, row1: number, row2: number, row3: number, h: Float64Array,
): void {
  const positiveEnd = Math.max(from, Math.min(to, positiveCount));
  for (let s = from; s < positiveEnd; s++) {
    const weight = weights[s]!;
    h[bins[row0 + s]!]! += weight;
    h[SLOT + bins[row1 + s]!]! += weight;
    h[2 * SLOT + bins[row2 + s]!]! += weight;
    h[3 * SLOT + bins[row3 + s]!]! += weight;
  }
  for (let s = positiveEnd; s < to; s++) {
    const weight = weights[s]!;
    h[NEGATIVES + bins[row0 + s]!]! += weight;
    h[SLOT + NEGATIVES + bins[row1 + s]!]! += weight;
    h[2 * SLOT + NEGATIVES + bins[row2 + s]!]! += weight;
    h[3 * SLOT + NEGATIVES + bins[row3 + s]!]! += weight;
  }
}

/**
 * The word path of the histogram pass: words wordFrom..wordTo−1 of four rows (word
 * offsets word0..word3), four samples per 32-bit read, in sample order, into the
 * half of each slot at `half` (0 for positives, NEGATIVES for negatives).
 */
function accumulateWords(
  words: Uint32Array, weights: Float64Array, wordFrom: number, wordTo: number, half: number,
  word0: number, word1: number, word2: number, word3: number, h: Float64Array,
): void {
  const h0 = half, h1 = SLOT + half, h2 = 2 * SLOT + half, h3 = 3 * SLOT + half;
  for (let i = wordFrom; i < wordTo; i++) {
    const s = i << 2;
    const a = weights[s]!, b = weights[s + 1]!, c = weights[s + 2]!, d = weights[s + 3]!;
    const x0 = words[word0 + i]!, x1 = words[word1 + i]!, x2 = words[word2 + i]!, x3 = words[word3 + i]!;
    h[h0 + (x0 & 255)]! += a; h[h1 + (x1 & 255)]! += a; h[h2 + (x2 & 255)]! += a; h[h3 + (x3 & 255)]! += a;
    h[h0 + ((x0 >>> 8) & 255)]! += b; h[h1 + ((x1 >>> 8) & 255)]! += b; h[h2 + ((x2 >>> 8) & 255)]! += b; h[h3 + ((x3 >>> 8) & 255)]! += b;
    h[h0 + ((x0 >>> 16) & 255)]! += c; h[h1 + ((x1 >>> 16) & 255)]! += c; h[h2 + ((x2 >>> 16) & 255)]! += c; h[h3 + ((x3 >>> 16) & 255)]! += c;
    h[h0 + (x0 >>> 24)]! += d; h[h1 + (x1 >>> 24)]! += d; h[h2 + (x2 >>> 24)]! += d; h[h3 + (x3 >>> 24)]! += d;
  }
}

/**
 * Scans one feature's histograms (positives at slot + b, negatives at
 * slot + NEGATIVES + b) for its best split; null without a split.
 */
function scanHistograms(h: Float64Array, slot: number, feature: number, gentle: boolean): SplitCandidate | null {
  let positiveTotal = 0;
  let negativeTotal = 0;
  let lastBin = 0;
  for (let b = 0; b < 256; b++) {
    const positive = h[slot + b]!;
    const negative = h[slot + NEGATIVES + b]!;
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
    const negative = h[slot + NEGATIVES + b - 1]!;
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
