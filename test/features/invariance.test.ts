import { describe, expect, it } from 'vitest';
import { enumerateFeatures } from '../../src/features/enumerate-features.js';
import { evaluateFeature, evaluateNormalizedFeature } from '../../src/features/evaluate-feature.js';
import { scaledFeatureCells } from '../../src/features/haar-feature.js';
import { createGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { worstAffineDifference } from '../helpers/affine-invariance.js';
import { randomGrayImage } from '../helpers/random-image.js';

function affine(image: GrayImage, gain: number, offset: number): GrayImage {
  return createGrayImage(image.width, image.height, image.data.map((v) => gain * v + offset));
}

function upscaleNearest(image: GrayImage, factor: number): GrayImage {
  const out = createGrayImage(image.width * factor, image.height * factor);
  for (let y = 0; y < out.height; y++) {
    for (let x = 0; x < out.width; x++) out.data[y * out.width + x] = image.data[Math.floor(y / factor) * image.width + Math.floor(x / factor)]!;
  }
  return out;
}

describe('feature invariances', () => {
  // Pixels kept in 0..63 so that 3·I + 20 still fits in 8 bits exactly.
  const base = createGrayImage(12, 10, randomGrayImage(12, 10, 'invariance').data.map((v) => v >> 2));
  const features = enumerateFeatures(12, 10);

  it('normalized values on a·I + b (a > 0) equal those on I (Viola & Jones 2001 §5.1 variance normalization)', () => {
    expect(worstAffineDifference(base, features, 3, 20)).toBeLessThan(1e-9);
  });

  it('every feature reads 0 on a flat window, at scale 1 and at rounded scales', () => {
    const flat = computeIntegralImage(createGrayImage(40, 40, new Uint8Array(1600).fill(200)));
    for (const scale of [1, 1.25, 1.7, 2.9]) {
      for (const feature of features.filter((_, i) => i % 7 === 0)) {
        expect(Math.abs(evaluateFeature(flat, feature, 1, 2, scale))).toBeLessThan(1e-9);
      }
    }
  });

  it('a feature at scale 2 on a 2× nearest-neighbour upscaled image equals the base feature on the original', () => {
    const original = computeIntegralImage(base);
    const doubled = computeIntegralImage(upscaleNearest(base, 2));
    for (const feature of features) {
      expect(evaluateFeature(doubled, feature, 0, 0, 2)).toBe(evaluateFeature(original, feature, 0, 0, 1));
      expect(evaluateNormalizedFeature(doubled, feature, 0, 0, 12, 10, 2)).toBeCloseTo(
        evaluateNormalizedFeature(original, feature, 0, 0, 12, 10, 1),
        10,
      );
    }
  });

  it('scaled cells stay contiguous and inside the rounded window', () => {
    for (const scale of [1.1, 1.25, 1.5625, 3.3]) {
      for (const feature of features) {
        const cells = scaledFeatureCells(feature, scale);
        for (const cell of cells) {
          expect(cell.width).toBeGreaterThanOrEqual(1);
          expect(cell.x + cell.width).toBeLessThanOrEqual(Math.round(12 * scale));
          expect(cell.y + cell.height).toBeLessThanOrEqual(Math.round(10 * scale));
        }
        // Zero mean: Σ weight · area = 0.
        expect(Math.abs(cells.reduce((s, c) => s + c.weight * c.width * c.height, 0))).toBeLessThan(1e-9);
      }
    }
  });
});
