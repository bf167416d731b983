import { checkThat } from '../check.js';
import { compileFeatures, type CompiledFeatures } from '../features/compiled-features.js';
import type { HaarFeature } from '../features/haar-feature.js';
import type { WindowSamples } from '../features/window-samples.js';
import { binEdge, quantizeBetween, quantizeResponses } from './response-bins.js';
import { packSampleColumns, type SampleColumns } from './sample-columns.js';

/**
 * Every feature's quantized response on every sample (DESIGN.md §4): row f holds
 * feature f's bins for samples 0..sampleCount−1, positives first, at
 * `bins[f · sampleCount + s]`. `minimums[f]` and `binWidths[f]` give the bin edges
 * (see response-bins.ts), so a split before bin b maps back to the real
 * variance-normalized value binEdge(minimums[f], binWidths[f], b).
 * Memory: featureCount · sampleCount bytes for the bins, plus 16 bytes per feature.
 */
export interface ResponseMatrix {
  readonly featureCount: number;
  readonly sampleCount: number;
  readonly positiveCount: number;
  readonly bins: Uint8Array;
  readonly minimums: Float64Array;
  readonly binWidths: Float64Array;
}

/** The model's split value for a split of feature f before bin `bin` (1..255). */
export function splitValueOf(matrix: ResponseMatrix, feature: number, bin: number): number {
  return binEdge(matrix.minimums[feature]!, matrix.binWidths[feature]!, bin);
}

/**
 * Quantizes ready-made responses (feature-major: `values[f · sampleCount + s]`)
 * into a ResponseMatrix. For tests and for features computed elsewhere.
 * @throws RectboostError `invalid-option` when sizes disagree or a value is not finite.
 */
export function responseMatrixFromValues(values: ArrayLike<number>, featureCount: number, sampleCount: number, positiveCount: number): ResponseMatrix {
  checkThat(values.length === featureCount * sampleCount, `Expected featureCount × sampleCount = ${featureCount * sampleCount} responses; received ${values.length}.`);
  checkThat(positiveCount >= 1 && positiveCount < sampleCount, `Expected 1 to ${sampleCount - 1} positives among ${sampleCount} samples; received ${positiveCount}.`);
  const bins = new Uint8Array(featureCount * sampleCount);
  const minimums = new Float64Array(featureCount);
  const binWidths = new Float64Array(featureCount);
  const row = new Float64Array(sampleCount);
  for (let f = 0; f < featureCount; f++) {
    for (let s = 0; s < sampleCount; s++) {
      const value = values[f * sampleCount + s]!;
      checkThat(Number.isFinite(value), `Response ${f * sampleCount + s} (feature ${f}, sample ${s}) must be finite; received ${value}.`);
      row[s] = value;
    }
    const { minimum, binWidth } = quantizeResponses(row, sampleCount, bins, f * sampleCount);
    minimums[f] = minimum;
    binWidths[f] = binWidth;
  }
  return { featureCount, sampleCount, positiveCount, bins, minimums, binWidths };
}

/** Where fillResponseRows writes: the matrix's arrays, possibly shared between threads. */
export interface ResponseRowsTarget {
  readonly bins: Uint8Array;
  readonly minimums: Float64Array;
  readonly binWidths: Float64Array;
}

/**
 * Computes and quantizes rows featureStart..featureEnd−1 of the response matrix.
 * This is the training hot loop (run in each worker on its share of features):
 * a feature's corner offsets and coefficients sit in locals, one loop per corner
 * count (6, 8, 9 for the basic kinds; any other count takes a generic loop), and the
 * samples stream through SampleColumns. The raw value is an exact integer (integer
 * coefficients times integer sums below 2^24), and it is multiplied by the same
 * Float64 1/σ as the scan kernel uses (inverseStandardDeviation), so training sees bit for bit the values that
 * the model will compute. `scratch` holds at least sampleCount values.
 */
export function fillResponseRows(
  samples: SampleColumns,
  compiled: Pick<CompiledFeatures, 'starts' | 'offsets' | 'coefficients'>,
  featureStart: number,
  featureEnd: number,
  target: ResponseRowsTarget,
  scratch: Float64Array = new Float64Array(samples.sampleCount),
): void {
  const { sampleCount: n, columns: t, inverseStandardDeviations: inverse } = samples;
  const { starts, offsets, coefficients } = compiled;
  for (let f = featureStart; f < featureEnd; f++) {
    const start = starts[f]!;
    const corners = starts[f + 1]! - start;
    // The smallest and largest response are tracked while computing, so the
    // quantizer needs no extra pass over the row.
    let minimum = Infinity;
    let maximum = -Infinity;
    if (corners === 6 || corners === 8 || corners === 9) {
      const o0 = offsets[start]! * n, o1 = offsets[start + 1]! * n, o2 = offsets[start + 2]! * n;
      const o3 = offsets[start + 3]! * n, o4 = offsets[start + 4]! * n, o5 = offsets[start + 5]! * n;
      const c0 = coefficients[start]!, c1 = coefficients[start + 1]!, c2 = coefficients[start + 2]!;
      const c3 = coefficients[start + 3]!, c4 = coefficients[start + 4]!, c5 = coefficients[start + 5]!;
      if (corners === 6) {
        for (let s = 0; s < n; s++) {
          const value = (c0 * t[o0 + s]! + c1 * t[o1 + s]! + c2 * t[o2 + s]! + c3 * t[o3 + s]! + c4 * t[o4 + s]! + c5 * t[o5 + s]!) * inverse[s]!;
          scratch[s] = value;
          if (value < minimum) minimum = value;
          if (value > maximum) maximum = value;
        }
      } else {
        const o6 = offsets[start + 6]! * n, o7 = offsets[start + 7]! * n;
        const c6 = coefficients[start + 6]!, c7 = coefficients[start + 7]!;
        if (corners === 8) {
          for (let s = 0; s < n; s++) {
            const value = (c0 * t[o0 + s]! + c1 * t[o1 + s]! + c2 * t[o2 + s]! + c3 * t[o3 + s]! +
              c4 * t[o4 + s]! + c5 * t[o5 + s]! + c6 * t[o6 + s]! + c7 * t[o7 + s]!) * inverse[s]!;
            scratch[s] = value;
            if (value < minimum) minimum = value;
            if (value > maximum) maximum = value;
          }
        } else {
          const o8 = offsets[start + 8]! * n;
          const c8 = coefficients[start + 8]!;
          for (let s = 0; s < n; s++) {
            const value = (c0 * t[o0 + s]! + c1 * t[o1 + s]! + c2 * t[o2 + s]! + c3 * t[o3 + s]! +
              c4 * t[o4 + s]! + c5 * t[o5 + s]! + c6 * t[o6 + s]! + c7 * t[o7 + s]! + c8 * t[o8 + s]!) * inverse[s]!;
            scratch[s] = value;
            if (value < minimum) minimum = value;
            if (value > maximum) maximum = value;
          }
        }
      }
    } else {
      for (let s = 0; s < n; s++) {
        let raw = 0;
        for (let k = start; k < start + corners; k++) raw += coefficients[k]! * t[offsets[k]! * n + s]!;
        const value = raw * inverse[s]!;
        scratch[s] = value;
        if (value < minimum) minimum = value;
        if (value > maximum) maximum = value;
      }
    }
    target.minimums[f] = n > 0 ? minimum : 0;
    target.binWidths[f] = quantizeBetween(scratch, n, minimum, maximum, target.bins, f * n);
  }
}

/**
 * Builds the whole response matrix in this thread: features × (positives, then
 * negatives), each response the variance-normalized feature value (raw value · 1/σ,
 * as the scan kernel computes it).
 * @throws RectboostError `invalid-option` when the sets' windows differ or a set is empty.
 * @example buildResponseMatrix(enumerateFeatures(24, 24), faces, backgrounds)
 */
export function buildResponseMatrix(features: readonly HaarFeature[], positives: WindowSamples, negatives: WindowSamples): ResponseMatrix {
  checkThat(positives.count >= 1 && negatives.count >= 1, `A response matrix needs at least one positive and one negative; received ${positives.count} and ${negatives.count}.`);
  const samples = packSampleColumns(positives, negatives);
  const compiled = compileFeatures(features, positives.windowWidth + 1, positives.rotatedAt);
  const featureCount = features.length;
  const target = {
    bins: new Uint8Array(featureCount * samples.sampleCount),
    minimums: new Float64Array(featureCount),
    binWidths: new Float64Array(featureCount),
  };
  fillResponseRows(samples, compiled, 0, featureCount, target);
  return { featureCount, sampleCount: samples.sampleCount, positiveCount: samples.positiveCount, ...target };
}
