import { evaluateNormalizedFeature } from '../../src/features/evaluate-feature.js';
import type { HaarFeature } from '../../src/features/haar-feature.js';
import { createGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage, type IntegralImageOptions } from '../../src/image/integral-image.js';

/**
 * The largest difference, over `features`, between a feature's normalized value on the
 * whole of `image` and on gain · image + offset (which must stay within 0..255). Variance
 * normalization makes it 0 up to rounding for gain > 0 (Viola & Jones 2001 §5.1).
 */
export function worstAffineDifference(image: GrayImage, features: readonly HaarFeature[], gain: number, offset: number, tables: IntegralImageOptions = {}): number {
  const original = computeIntegralImage(image, tables);
  const changed = computeIntegralImage(createGrayImage(image.width, image.height, image.data.map((v) => gain * v + offset)), tables);
  let worst = 0;
  for (const feature of features) {
    const a = evaluateNormalizedFeature(original, feature, 0, 0, image.width, image.height);
    const b = evaluateNormalizedFeature(changed, feature, 0, 0, image.width, image.height);
    worst = Math.max(worst, Math.abs(a - b));
  }
  return worst;
}
