import { rectangleSum, type IntegralImage } from './integral-image.js';

/**
 * Windows whose pixel variance is below this (grey levels²) count as flat:
 * they carry no pattern, so detection rejects them and training gives them
 * all-zero normalized responses instead of dividing by ~0.
 * 1e-4 is far below the smallest non-zero variance of any window of up to
 * 10^4 pixels of 8-bit data ((n − 1)/n² ≥ 1e-4 only for n ≤ 10^4; larger,
 * almost-flat windows are treated as flat on purpose).
 */
export const FLAT_WINDOW_VARIANCE = 1e-4;

/** Mean and standard deviation of the pixels in one window. */
export interface WindowStatistics {
  readonly mean: number;
  readonly standardDeviation: number;
}

/**
 * The window σ rule, the one home of it: every path that normalizes a window
 * (training samples, mining, retuning, patch evaluation, detection) gets 1/σ from
 * these operations in this order, so they all hold the same bits (the scan kernel's
 * SIMD lanes repeat them operation for operation; a test compares the two):
 *   mean = total · (1/n); variance = squaredTotal · (1/n) − mean · mean;
 *   flat when variance < FLAT_WINDOW_VARIANCE (result 0), else 1 / √variance.
 * `total` and `squaredTotal` are the window's pixel sum and squared-pixel sum
 * (exact integers from the integral tables); `inversePixelCount` is 1 / (width · height).
 */
export function inverseStandardDeviation(total: number, squaredTotal: number, inversePixelCount: number): number {
  const mean = total * inversePixelCount;
  const variance = squaredTotal * inversePixelCount - mean * mean;
  return variance < FLAT_WINDOW_VARIANCE ? 0 : 1 / Math.sqrt(variance);
}

/** 1/σ of the half-open window {x, y, width, height} (inverseStandardDeviation), 0 when flat. */
export function windowInverseDeviation(integral: IntegralImage, x: number, y: number, width: number, height: number): number {
  return inverseStandardDeviation(
    rectangleSum(integral.sum, integral.stride, x, y, width, height),
    rectangleSum(integral.squaredSum, integral.stride, x, y, width, height),
    1 / (width * height),
  );
}

/**
 * Mean and (population) standard deviation of the half-open window
 * {x, y, width, height}, in O(1) from the two tables: var = E[I²] − E[I]², with
 * the arithmetic of inverseStandardDeviation (so 1 / standardDeviation is its result).
 * Returns standardDeviation 0 for flat windows (variance below FLAT_WINDOW_VARIANCE).
 */
export function windowStatistics(integral: IntegralImage, x: number, y: number, width: number, height: number): WindowStatistics {
  const inverseCount = 1 / (width * height);
  const mean = rectangleSum(integral.sum, integral.stride, x, y, width, height) * inverseCount;
  const variance = rectangleSum(integral.squaredSum, integral.stride, x, y, width, height) * inverseCount - mean * mean;
  return { mean, standardDeviation: variance < FLAT_WINDOW_VARIANCE ? 0 : Math.sqrt(variance) };
}
