import { RectboostError } from '../errors.js';
import { rectangleSum, tiltedRectangleSum, type IntegralImage } from '../image/integral-image.js';
import { windowInverseDeviation } from '../image/window-statistics.js';
import { scaledFeatureCells, type HaarFeature } from './haar-feature.js';

/**
 * Raw value of a feature on a window whose top-left corner is (windowX, windowY)
 * at detector scale `scale` ≥ 1: Σ weight · cell sum over the scaled cells
 * (see scaleRectangle for rounding and weight rebalancing; the base window size
 * windowWidth × windowHeight matters only for tilted cells at its edge). At scale 1
 * this is the plain rectangle feature. The caller guarantees the scaled window lies
 * inside the image.
 * @throws RectboostError `invalid-option` for a tilted feature on tables without the rotated part.
 */
export function evaluateFeature(integral: IntegralImage, feature: HaarFeature, windowX: number, windowY: number, scale = 1, windowWidth = Infinity, windowHeight = Infinity): number {
  let value = 0;
  for (const cell of scaledFeatureCells(feature, scale, windowWidth, windowHeight)) {
    const x = windowX + cell.x;
    const y = windowY + cell.y;
    if (cell.tilted !== true) {
      value += cell.weight * rectangleSum(integral.sum, integral.stride, x, y, cell.width, cell.height);
      continue;
    }
    if (integral.rotatedAt === undefined) throw new RectboostError('invalid-option', `A ${feature.kind} feature needs the rotated table; build it with computeIntegralImage(image, { rotated: true }).`);
    value += cell.weight * tiltedRectangleSum(integral.sum, integral.rotatedAt, integral.stride, x, y, cell.width, cell.height);
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
  return evaluateFeature(integral, feature, windowX, windowY, scale, windowWidth, windowHeight) * inverseDeviation;
}
