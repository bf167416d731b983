/**
 * Weighted class histograms of binned responses: the first half of the weak-learner
 * search (the split scan in best-split.ts reads them).
 *
 * Layout of one feature's histograms, from its slot start: the positive weight of bin b
 * at slot + b, the negative weight at slot + HISTOGRAM_NEGATIVES + b (b = 0..255). A
 * scratch holds HISTOGRAM_GROUP such slots, one per feature of a group.
 *
 * Two builders produce these sums. `buildHistogramGroup` is the fast one the training hot
 * loop runs; `buildHistogramNaive` is the plain loop kept beside it so tests can prove
 * that both give the same doubles bit for bit. Both add each feature's weights in sample
 * order, and floating-point addition in a fixed order is deterministic, so equality is
 * exact rather than approximate.
 */

/** Features whose histograms the fast builder fills in one pass over the weights. */
export const HISTOGRAM_GROUP = 4;
/** Offset of the negative half inside one feature's slot. */
export const HISTOGRAM_NEGATIVES = 256;
/** Doubles per feature: 256 positive bins, then 256 negative bins. */
export const HISTOGRAM_SLOT = 512;

/** True where a Uint32 read of four bins yields sample s in bits 8·(s mod 4) (little-endian). */
const LITTLE_ENDIAN = new Uint8Array(new Uint32Array([1]).buffer)[0] === 1;

/** The histogram arrays one thread reuses: HISTOGRAM_GROUP features × 2 classes × 256 bins. */
export function createSplitScratch(): Float64Array {
  return new Float64Array(HISTOGRAM_GROUP * HISTOGRAM_SLOT);
}

/**
 * The response matrix read as one 32-bit word per four samples, or null when its rows
 * do not start on 4-byte boundaries (sampleCount not a multiple of 4, `bins` not 4-byte
 * aligned, or a big-endian host); the fast builder then reads byte by byte.
 * Made once per search, not per group.
 */
export function binWords(bins: Uint8Array, sampleCount: number): Uint32Array | null {
  return LITTLE_ENDIAN && sampleCount % 4 === 0 && bins.byteOffset % 4 === 0
    ? new Uint32Array(bins.buffer, bins.byteOffset, bins.length >>> 2)
    : null;
}

/**
 * Fills the scratch with the histograms of features firstFeature..firstFeature+members−1
 * (members 1..HISTOGRAM_GROUP), feature k of the group in slot k.
 *
 * IN: `bins` (features × samples, row f at f·sampleCount), `words` = binWords(bins,
 * sampleCount), the first `positiveCount` samples positive, `weights` per sample.
 * OUT: `scratch`, cleared first.
 *
 * Why it is written this way (the training hot loop): four features go at once, so each
 * weight is loaded once for four rows and the four read-modify-writes in flight belong to
 * different histograms and never wait on each other; positives are summed before
 * negatives, so the class comes from the loop and no label is read; on the word path one
 * 32-bit load brings four samples' bins, which cuts loads by four. A group of fewer than
 * four re-reads its first row into the unused slots, which the caller ignores.
 * Every histogram still receives its weights in sample order (see buildHistogramNaive).
 */
export function buildHistogramGroup(
  bins: Uint8Array, words: Uint32Array | null, sampleCount: number, positiveCount: number,
  weights: Float64Array, firstFeature: number, members: number, scratch: Float64Array,
): void {
  const n = sampleCount;
  const row0 = firstFeature * n;
  const row1 = members > 1 ? row0 + n : row0;
  const row2 = members > 2 ? row0 + 2 * n : row0;
  const row3 = members > 3 ? row0 + 3 * n : row0;
  scratch.fill(0);
  if (words === null) {
    accumulateBytes(bins, weights, 0, n, positiveCount, row0, row1, row2, row3, scratch);
    return;
  }
  // Whole words of positives, the word shared by both classes (if any) byte by byte,
  // then whole words of negatives: every sample in order.
  const positiveWords = positiveCount >>> 2;
  const negativeWords = (positiveCount + 3) >>> 2;
  const word0 = row0 >>> 2, word1 = row1 >>> 2, word2 = row2 >>> 2, word3 = row3 >>> 2;
  accumulateWords(words, weights, 0, positiveWords, 0, word0, word1, word2, word3, scratch);
  accumulateBytes(bins, weights, positiveWords << 2, negativeWords << 2, positiveCount, row0, row1, row2, row3, scratch);
  accumulateWords(words, weights, negativeWords, n >>> 2, HISTOGRAM_NEGATIVES, word0, word1, word2, word3, scratch);
}

/**
 * The plain twin of buildHistogramGroup for one feature, kept for tests: one sample at a
 * time, in sample order, into a fresh slot (positives at b, negatives at
 * HISTOGRAM_NEGATIVES + b).
 */
export function buildHistogramNaive(
  bins: Uint8Array, sampleCount: number, positiveCount: number, weights: Float64Array, feature: number,
): Float64Array {
  const histogram = new Float64Array(HISTOGRAM_SLOT);
  const row = feature * sampleCount;
  for (let s = 0; s < sampleCount; s++) {
    const half = s < positiveCount ? 0 : HISTOGRAM_NEGATIVES;
    histogram[half + bins[row + s]!]! += weights[s]!;
  }
  return histogram;
}

/**
 * Adds weights of samples from..to−1 of four rows (byte offsets row0..row3) into the
 * four slots, one sample at a time in sample order; positives (s < positiveCount) into
 * the positive half.
 */
function accumulateBytes(
  bins: Uint8Array, weights: Float64Array, from: number, to: number, positiveCount: number,
  row0: number, row1: number, row2: number, row3: number, h: Float64Array,
): void {
  const S = HISTOGRAM_SLOT, N = HISTOGRAM_NEGATIVES;
  const positiveEnd = Math.max(from, Math.min(to, positiveCount));
  for (let s = from; s < positiveEnd; s++) {
    const weight = weights[s]!;
    h[bins[row0 + s]!]! += weight;
    h[S + bins[row1 + s]!]! += weight;
    h[2 * S + bins[row2 + s]!]! += weight;
    h[3 * S + bins[row3 + s]!]! += weight;
  }
  for (let s = positiveEnd; s < to; s++) {
    const weight = weights[s]!;
    h[N + bins[row0 + s]!]! += weight;
    h[S + N + bins[row1 + s]!]! += weight;
    h[2 * S + N + bins[row2 + s]!]! += weight;
    h[3 * S + N + bins[row3 + s]!]! += weight;
  }
}

/**
 * The word path: words wordFrom..wordTo−1 of four rows (word offsets word0..word3), four
 * samples per 32-bit read, in sample order, into the half of each slot at `half` (0 for
 * positives, HISTOGRAM_NEGATIVES for negatives).
 */
function accumulateWords(
  words: Uint32Array, weights: Float64Array, wordFrom: number, wordTo: number, half: number,
  word0: number, word1: number, word2: number, word3: number, h: Float64Array,
): void {
  const S = HISTOGRAM_SLOT;
  const h0 = half, h1 = S + half, h2 = 2 * S + half, h3 = 3 * S + half;
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
