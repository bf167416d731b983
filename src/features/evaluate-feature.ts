import { rectangleSum, type IntegralImage } from '../image/integral-image.js';
import { windowInverseDeviation } from '../image/window-statistics.js';
import { scaledFeatureCells, type HaarFeature } from './haar-feature.js';

/**
 * Raw value of a feature on a window whose top-left corner is (windowX, windowY)
 * at detector scale `scale` ≥ 1: Σ weight · cell sum over the scaled cells
 * (see scaledFeatureCells for rounding and weight rebalancing). At scale 1 this
 * is the plain Viola–Jones rectangle feature. The caller guarantees the scaled
 * window lies inside the image.
 */
export function evaluateFeature(integral: IntegralImage, feature: HaarFeature, windowX: number, windowY: number, scale = 1): number {
  let value = 0;
  for (const cell of scaledFeatureCells(feature, scale)) {
    value += cell.weight * rectangleSum(integral.sum, integral.stride, windowX + cell.x, windowY + cell.y, cell.width, cell.height);
  }
  return value;
}

/**
 * Variance-normalized value: the raw value times 1/σ (windowInverseDeviation) of
 * the scaled window round(windowWidth·scale) × round(windowHeight·scale)
 * (Viola & Jones 2001 §5.1 normalize by the window's σ). A window a·I + b with
 * a > 0 gives the same value as I. Flat windows give 0.
 */
export function evaluateNormalizedFeature(
  integral: IntegralImage,
  feature: HaarFeature,
  windowX: number,
  windowY: number,
  windowWidth: number,
  windowHeight: number,
  scale = 1,
): number {
  const inverseDeviation = windowInverseDeviation(
    integral, windowX, windowY, Math.round(windowWidth * scale), Math.round(windowHeight * scale),
  );
  if (inverseDeviation === 0) return 0;
  return evaluateFeature(integral, feature, windowX, windowY, scale) * inverseDeviation;
}
