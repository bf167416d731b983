import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { searchBestSplit } from '../../src/boost/best-split.js';
import type { BoosterKind } from '../../src/boost/booster.js';
import { binEdge } from '../../src/boost/response-bins.js';
import { responseMatrixFromValues, splitValueOf } from '../../src/boost/response-matrix.js';

/** A small random problem: values[f][s], positives first, random normalized weights. */
function randomProblem(seed: string, features: number, samples: number, positives: number, integer: boolean) {
  const random = seedrandom(seed);
  const values = new Float64Array(features * samples);
  for (let i = 0; i < values.length; i++) {
    values[i] = integer ? Math.floor(random() * 256) : (random() - 0.5) * 7 + (random() < 0.05 ? 40 * random() : 0);
  }
  const weights = new Float64Array(samples);
  let total = 0;
  for (let s = 0; s < samples; s++) total += weights[s] = 0.05 + random();
  for (let s = 0; s < samples; s++) weights[s]! /= total;
  return { values, weights };
}

/**
 * The brute-force twin: every feature, every threshold between distinct raw values,
 * errors summed sample by sample (no histograms, no bins).
 */
function bruteForceBest(values: Float64Array, features: number, samples: number, positives: number, weights: Float64Array, booster: BoosterKind) {
  let best = { error: Infinity, feature: -1, threshold: NaN };
  for (let f = 0; f < features; f++) {
    const row = Array.from(values.subarray(f * samples, (f + 1) * samples));
    const distinct = [...new Set(row)].sort((a, b) => a - b);
    for (let k = 1; k < distinct.length; k++) {
      const threshold = distinct[k]!; // below iff value < threshold
      let pb = 0, nb = 0, pa = 0, na = 0;
      for (let s = 0; s < samples; s++) {
        const w = weights[s]!;
        if (row[s]! < threshold) { if (s < positives) pb += w; else nb += w; } else if (s < positives) pa += w; else na += w;
      }
      const error = booster === 'discrete'
        ? Math.min(pb + na, nb + pa)
        : pb + nb + pa + na - (pb + nb > 0 ? (pb - nb) ** 2 / (pb + nb) : 0) - (pa + na > 0 ? (pa - na) ** 2 / (pa + na) : 0);
      if (error < best.error - 1e-15) best = { error, feature: f, threshold };
    }
  }
  return best;
}

describe('weak-learner search over binned responses', () => {
  for (const booster of ['discrete', 'gentle'] as const) {
    it(`finds exactly the brute-force minimum for integer values below 256 (${booster})`, () => {
      for (let trial = 0; trial < 8; trial++) {
        const features = 12, samples = 90, positives = 37;
        const { values, weights } = randomProblem(`integer-${booster}-${trial}`, features, samples, positives, true);
        const matrix = responseMatrixFromValues(values, features, samples, positives);
        const found = searchBestSplit(matrix.bins, samples, positives, weights, booster, 0, features)!;
        const brute = bruteForceBest(values, features, samples, positives, weights, booster);
        // Integers spanning ≤ 255 get bins narrower than 1, so bins and raw thresholds give
        // the same partitions; only summation order differs (1e-12).
        expect(found.error).toBeCloseTo(brute.error, 12);
        expect(found.feature).toBe(brute.feature);
      }
    });

    it(`stays within one bin's weight of the brute-force minimum for real values (${booster})`, () => {
      for (let trial = 0; trial < 8; trial++) {
        const features = 10, samples = 400, positives = 150;
        const { values, weights } = randomProblem(`real-${booster}-${trial}`, features, samples, positives, false);
        const matrix = responseMatrixFromValues(values, features, samples, positives);
        const found = searchBestSplit(matrix.bins, samples, positives, weights, booster, 0, features)!;
        const brute = bruteForceBest(values, features, samples, positives, weights, booster);
        // Every bin edge is one of the raw thresholds, so binning can only lose: found ≥ brute.
        // Moving the brute-force threshold to the edge of its bin re-classifies only the samples
        // in that bin, so the loss is at most that bin's weight (for squared error, at most
        // twice the bin weight times the largest squared change of output, (2)² — we bound by 8·w).
        const f = brute.feature;
        const row = matrix.bins.subarray(f * samples, (f + 1) * samples);
        const edgeBin = row[values.subarray(f * samples, (f + 1) * samples).indexOf(brute.threshold)]!;
        let binWeight = 0;
        for (let s = 0; s < samples; s++) if (row[s] === edgeBin || row[s] === edgeBin - 1) binWeight += weights[s]!;
        expect(found.error).toBeGreaterThanOrEqual(brute.error - 1e-12);
        expect(found.error).toBeLessThanOrEqual(brute.error + (booster === 'discrete' ? binWeight : 8 * binWeight) + 1e-12);
      }
    });
  }

  // The search reads bins four at a time when rows start on 4-byte boundaries (sample
  // counts divisible by 4) and one at a time otherwise; both must give the same answer.
  for (const positives of [37, 40]) {
    it(`reads 32-bit words exactly like single bytes (92 samples, ${positives} positives, 13 features)`, () => {
      for (const booster of ['discrete', 'gentle'] as const) {
        const features = 13, samples = 92;
        const { values, weights } = randomProblem(`words-${booster}-${positives}`, features, samples, positives, true);
        const matrix = responseMatrixFromValues(values, features, samples, positives);
        const byWords = searchBestSplit(matrix.bins, samples, positives, weights, booster, 0, features)!;
        // The same bins one byte into a larger buffer: not 4-byte aligned, so the byte path runs.
        const shifted = new Uint8Array(matrix.bins.length + 1).subarray(1);
        shifted.set(matrix.bins);
        const byBytes = searchBestSplit(shifted, samples, positives, weights, booster, 0, features)!;
        // Both paths add each feature's weights in sample order, so the sums agree bit for bit.
        expect(byWords).toEqual(byBytes);
        // Brute-force twin as in the integer test above (same partitions, 1e-12 for summation order).
        const brute = bruteForceBest(values, features, samples, positives, weights, booster);
        expect(byWords.feature).toBe(brute.feature);
        expect(byWords.error).toBeCloseTo(brute.error, 12);
      }
    });
  }

  it('gives every feature the same candidate whatever range it is searched in', () => {
    // Ranges that start at each offset within a group of four: a feature's sums must not
    // depend on the features that share its pass (1 vs N workers rely on this).
    const features = 11, samples = 64, positives = 21;
    const { values, weights } = randomProblem('ranges', features, samples, positives, false);
    const matrix = responseMatrixFromValues(values, features, samples, positives);
    for (let f = 0; f < features; f++) {
      const alone = searchBestSplit(matrix.bins, samples, positives, weights, 'gentle', f, f + 1);
      for (let start = Math.max(0, f - 3); start <= f; start++) {
        for (let end = f + 1; end <= Math.min(features, f + 4); end++) {
          // Each single-feature candidate must match the one found in a wider range when that feature wins there.
          const found = searchBestSplit(matrix.bins, samples, positives, weights, 'gentle', start, end)!;
          const own = searchBestSplit(matrix.bins, samples, positives, weights, 'gentle', found.feature, found.feature + 1);
          expect(found).toEqual(own);
        }
      }
      expect(alone).not.toBeNull();
    }
  });

  it('maps a split back to a real value consistent with every training sample', () => {
    const features = 6, samples = 500;
    const { values } = randomProblem('edges', features, samples, 200, false);
    const matrix = responseMatrixFromValues(values, features, samples, 200);
    for (let f = 0; f < features; f++) {
      for (const bin of [1, 17, 128, 200, 255]) {
        const split = splitValueOf(matrix, f, bin);
        expect(split).toBe(binEdge(matrix.minimums[f]!, matrix.binWidths[f]!, bin));
        for (let s = 0; s < samples; s++) {
          // The model's rule (value < splitValue) and the training rule (bin < split bin) agree.
          expect(values[f * samples + s]! < split).toBe(matrix.bins[f * samples + s]! < bin);
        }
      }
    }
  });

  it('breaks ties by the lowest feature index', () => {
    // Three identical features: every split ties, so feature 0 must win.
    const row = [5, 9, 1, 200, 3, 7];
    const values = Float64Array.from([...row, ...row, ...row]);
    const matrix = responseMatrixFromValues(values, 3, 6, 3);
    const weights = new Float64Array(6).fill(1 / 6);
    expect(searchBestSplit(matrix.bins, 6, 3, weights, 'discrete', 0, 3)!.feature).toBe(0);
    expect(searchBestSplit(matrix.bins, 6, 3, weights, 'discrete', 1, 3)!.feature).toBe(1);
  });

  it('offers no split on a constant feature', () => {
    const matrix = responseMatrixFromValues(new Float64Array(8).fill(2.5), 1, 8, 4);
    expect(searchBestSplit(matrix.bins, 8, 4, new Float64Array(8).fill(1 / 8), 'gentle', 0, 1)).toBeNull();
  });
});
