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
 * Mean and (population) standard deviation of the half-open window
 * {x, y, width, height}, in O(1) from the two tables: var = E[I²] − E[I]².
 * Returns standardDeviation 0 for flat windows (variance below FLAT_WINDOW_VARIANCE).
 */
export function windowStatistics(integral: IntegralImage, x: number, y: number, width: number, height: number): WindowStatistics {
  const count = width * height;
  const mean = rectangleSum(integral.sum, integral.stride, x, y, width, height) / count;
  const meanOfSquares = rectangleSum(integral.squaredSum, integral.stride, x, y, width, height) / count;
  const variance = meanOfSquares - mean * mean;
  return { mean, standardDeviation: variance < FLAT_WINDOW_VARIANCE ? 0 : Math.sqrt(variance) };
}
