import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import {
  binWords,
  buildHistogramGroup,
  buildHistogramNaive,
  createSplitScratch,
  HISTOGRAM_GROUP,
  HISTOGRAM_SLOT,
} from '../../src/boost/split-histogram.js';

/** Random bins (features × samples, as a response matrix stores them) and normalized random weights. */
function randomBins(seed: string, features: number, samples: number) {
  const random = seedrandom(seed);
  const bins = new Uint8Array(features * samples);
  // A few bins hold most samples, as on real features, so sums run long in some bins.
  for (let i = 0; i < bins.length; i++) bins[i] = random() < 0.5 ? Math.floor(random() * 4) : Math.floor(random() * 256);
  const weights = new Float64Array(samples);
  let total = 0;
  for (let s = 0; s < samples; s++) total += weights[s] = 0.01 + random();
  for (let s = 0; s < samples; s++) weights[s]! /= total;
  return { bins, weights };
}

/**
 * The first bin where two histograms differ in any bit (signs of zero included), or −1;
 * compared as raw bytes, so equality is bit for bit, not within a tolerance.
 */
function firstDifference(first: Float64Array, second: Float64Array): number {
  const a = new BigUint64Array(first.buffer, first.byteOffset, first.length);
  const b = new BigUint64Array(second.buffer, second.byteOffset, second.length);
  if (a.length !== b.length) return 0;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return i;
  return -1;
}

/**
 * Builds every group of features 0..features−1 with the fast builder and checks each
 * member's slot against the naive twin; `bins` may be any view (aligned or not).
 */
function expectGroupsMatchTwin(bins: Uint8Array, features: number, samples: number, positives: number, weights: Float64Array) {
  const scratch = createSplitScratch();
  const words = binWords(bins, samples);
  for (let f = 0; f < features; f += HISTOGRAM_GROUP) {
    const members = Math.min(HISTOGRAM_GROUP, features - f);
    buildHistogramGroup(bins, words, samples, positives, weights, f, members, scratch);
    for (let member = 0; member < members; member++) {
      const fast = scratch.subarray(member * HISTOGRAM_SLOT, (member + 1) * HISTOGRAM_SLOT);
      expect(firstDifference(fast, buildHistogramNaive(bins, samples, positives, weights, f + member)), `feature ${f + member}`).toBe(-1);
    }
  }
}

describe('histogram building: the fast builder against its naive twin', () => {
  // Positive counts at every offset inside a 4-sample word (word path), and sample counts
  // that are not multiples of 4 (byte path); 7 and 13 features leave groups of 3 and 1.
  for (const [samples, positives, features] of [[96, 40, 7], [96, 41, 13], [96, 42, 7], [96, 43, 13], [97, 40, 7], [99, 1, 5], [100, 99, 6]] as const) {
    it(`gives the same doubles bit for bit (${samples} samples, ${positives} positives, ${features} features)`, () => {
      const { bins, weights } = randomBins(`twin-${samples}-${positives}`, features, samples);
      expect(binWords(bins, samples) !== null).toBe(samples % 4 === 0);
      expectGroupsMatchTwin(bins, features, samples, positives, weights);
    });
  }

  it('gives the same doubles when the bins are not 4-byte aligned (byte path on a multiple of 4)', () => {
    const samples = 64, positives = 23, features = 6;
    const { bins, weights } = randomBins('unaligned', features, samples);
    const shifted = new Uint8Array(bins.length + 1).subarray(1);
    shifted.set(bins);
    expect(binWords(shifted, samples)).toBeNull();
    expectGroupsMatchTwin(shifted, features, samples, positives, weights);
  });

  it('puts each class’s weight in its own half, and nothing else (invariant: the halves sum to the class weights)', () => {
    const samples = 48, positives = 20;
    const { bins, weights } = randomBins('halves', 1, samples);
    const histogram = buildHistogramNaive(bins, samples, positives, weights, 0);
    const sum = (values: ArrayLike<number>) => Array.from(values).reduce((a, b) => a + b, 0);
    expect(sum(histogram.subarray(0, 256))).toBeCloseTo(sum(weights.subarray(0, positives)), 14);
    expect(sum(histogram.subarray(256))).toBeCloseTo(sum(weights.subarray(positives)), 14);
    // Each sample lands in its own bin: sample 0 is positive, the last one negative.
    expect(histogram[bins[0]!]!).toBeGreaterThanOrEqual(weights[0]!);
    expect(histogram[256 + bins[samples - 1]!]!).toBeGreaterThanOrEqual(weights[samples - 1]!);
  });
});
