/**
 * Per-feature 8-bit quantization of responses, shared by the response-matrix
 * builders and the split search.
 *
 * Binning: 256 equal-width bins between the feature's smallest and largest
 * response on the current samples. Edge b (1 ≤ b ≤ 255) is the Float64 value
 * `minimum + b · binWidth` with `binWidth = (maximum − minimum) / 256`, and a value's
 * bin is the number of edges it reaches: bin(v) = #{b ≥ 1 : v ≥ edge(b)}.
 * Because edges grow with b, bin(v) < b ⇔ v < edge(b) holds exactly, so a split
 * chosen "before bin b" in training is the model's rule "below iff v < splitValue"
 * with splitValue = edge(b), for every training sample, with no rounding slack.
 *
 * Why min/max bins rather than quantiles: no sort (the build stays linear), two
 * numbers per feature, and exactness for integer responses — any feature whose
 * values are integers spanning at most 255 has binWidth < 1, so distinct values
 * never share a bin and the histogram search equals the exhaustive one. The cost
 * is resolution on long-tailed features, where a few outliers stretch the range;
 * variance normalization keeps Haar-like responses in a narrow range, so this
 * matters little in practice (common practice in histogram boosting, e.g. Ke et al.
 * 2017 bin by quantiles for the general case).
 */
export const BIN_COUNT = 256;

/** Reused edge table (this module is synchronous, so one per thread suffices). */
const EDGES = new Float64Array(BIN_COUNT + 1);

/**
 * Quantizes `values[0..count-1]` into `bins[offset .. offset+count-1]` and returns
 * the feature's minimum and bin width (0 for a constant feature, whose samples all
 * go to bin 0 and which offers no split). Values must be finite.
 */
export function quantizeResponses(values: Float64Array, count: number, bins: Uint8Array, offset: number): { minimum: number; binWidth: number } {
  let minimum = Infinity;
  let maximum = -Infinity;
  for (let s = 0; s < count; s++) {
    const value = values[s]!;
    if (value < minimum) minimum = value;
    if (value > maximum) maximum = value;
  }
  const binWidth = quantizeBetween(values, count, minimum, maximum, bins, offset);
  return { minimum: count > 0 ? minimum : 0, binWidth };
}

/**
 * The second half of quantizeResponses, for callers that tracked the minimum and
 * maximum of `values[0..count-1]` while computing them (saves a pass): writes the
 * bins and returns the bin width (0 for a constant feature, all in bin 0).
 */
export function quantizeBetween(values: Float64Array, count: number, minimum: number, maximum: number, bins: Uint8Array, offset: number): number {
  const binWidth = (maximum - minimum) / BIN_COUNT;
  if (!(binWidth > 0)) {
    bins.fill(0, offset, offset + count);
    return 0;
  }
  // edges[b] = binEdge(minimum, binWidth, b) for 1..255, with sentinels −∞ and +∞,
  // so one table lookup per side checks a bin without special cases. The edges
  // never decrease (rounding is monotone), so edges[bin] ≤ v < edges[bin + 1]
  // means exactly bin(v) = bin.
  const edges = EDGES;
  edges[0] = -Infinity;
  for (let b = 1; b < BIN_COUNT; b++) edges[b] = minimum + b * binWidth;
  edges[BIN_COUNT] = Infinity;
  const inverseWidth = 1 / binWidth;
  for (let s = 0; s < count; s++) {
    const value = values[s]!;
    // (value − minimum) is ≥ 0 and the product at most 256 plus rounding, so
    // truncation is the floor and `bin >>> 8` is 1 only for 256, which belongs
    // in the top bin. Rounding can still put the estimate one bin off near an
    // edge; the check catches that (rarely, so the branch predicts well) and
    // the slow path counts the edges the value reaches.
    let bin = ((value - minimum) * inverseWidth) | 0;
    bin -= bin >>> 8;
    if (value < edges[bin]! || value >= edges[bin + 1]!) {
      bin = 0;
      while (value >= edges[bin + 1]!) bin++;
    }
    bins[offset + s] = bin;
  }
  return binWidth;
}

/** Lower edge of bin `bin` (1..255): the split value that sends bins < `bin` below. */
export function binEdge(minimum: number, binWidth: number, bin: number): number {
  return minimum + bin * binWidth;
}
