import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { compileFeatures, evaluateCompiledFeature } from '../../src/features/compiled-features.js';
import { evaluateFeature } from '../../src/features/evaluate-feature.js';
import type { FeatureKind } from '../../src/features/feature-kind.js';
import type { HaarFeature } from '../../src/features/haar-feature.js';
import { createGrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage, rectangleSum } from '../../src/image/integral-image.js';

// Fixture made by scripts/make-feature-fixture.py from scikit-image's haar_like_feature
// (Debian python3-skimage); it records the library version and the patch pixels.
interface FeatureFixture {
  libraryVersion: string;
  windowWidth: number;
  windowHeight: number;
  features: Array<{ type: string; rects: number[][] }>;
  samples: Array<{ source: string; pixels: number[]; values: number[] }>;
}
const fixture = JSON.parse(readFileSync(new URL('../fixtures/skimage-haar-features.json', import.meta.url), 'utf8')) as FeatureFixture;

const KIND_OF_TYPE: Record<string, FeatureKind> = {
  'type-2-x': 'two-horizontal',
  'type-2-y': 'two-vertical',
  'type-3-x': 'three-horizontal',
  'type-3-y': 'three-vertical',
  'type-4': 'four-diagonal',
};

/** Our descriptor for a scikit-image feature: its first rectangle is our top-left cell. */
function toOurFeature(type: string, rects: number[][]): HaarFeature {
  const [x, y, cellWidth, cellHeight] = rects[0]!;
  return { kind: KIND_OF_TYPE[type]!, x: x!, y: y!, cellWidth: cellWidth!, cellHeight: cellHeight! };
}

/**
 * scikit-image's value from ours, by the sign conventions measured on unit cells:
 * - two-cell: skimage = second − first; ours = first − second → skimage = −ours.
 * - four-cell: skimage = −TL + TR − BR + BL; ours = TL − TR − BL + BR → skimage = −ours.
 * - three-cell: skimage = −side + centre − side (not zero-mean); ours = −side + 2·centre − side
 *   → skimage = ours − centre sum.
 */
function toSkimageValue(feature: HaarFeature, ours: number, centreSum: number): number {
  switch (feature.kind) {
    case 'two-horizontal':
    case 'two-vertical':
    case 'four-diagonal':
      return -ours;
    case 'three-horizontal':
    case 'three-vertical':
      return ours - centreSum;
    default:
      throw new Error(`scikit-image has no ${feature.kind} feature`);
  }
}

describe(`feature values against scikit-image ${fixture.libraryVersion} haar_like_feature`, () => {
  const { windowWidth, windowHeight } = fixture;
  const ours = fixture.features.map((f) => toOurFeature(f.type, f.rects));

  it('describes the same rectangles as scikit-image for every feature', () => {
    fixture.features.forEach((f, i) => {
      const feature = ours[i]!;
      // Every skimage rectangle has our cell size and lies on our cell grid.
      for (const [x, y, w, h] of f.rects) {
        expect([w, h]).toEqual([feature.cellWidth, feature.cellHeight]);
        expect((x! - feature.x) % feature.cellWidth + (y! - feature.y) % feature.cellHeight).toBe(0);
      }
    });
  });

  for (const sample of fixture.samples) {
    it(`gives every one of ${fixture.features.length} values on ${sample.source}`, () => {
      const image = createGrayImage(windowWidth, windowHeight, Uint8Array.from(sample.pixels));
      const integral = computeIntegralImage(image);
      const compiled = compileFeatures(ours, integral.stride);
      let mismatches = 0;
      ours.forEach((feature, i) => {
        const centre = fixture.features[i]!.rects[1]!;
        const centreSum = rectangleSum(integral.sum, integral.stride, centre[0]!, centre[1]!, centre[2]!, centre[3]!);
        const direct = evaluateFeature(integral, feature, 0, 0);
        const fast = evaluateCompiledFeature(compiled, i, integral.sum, 0);
        if (direct !== fast || toSkimageValue(feature, direct, centreSum) !== sample.values[i]) mismatches++;
      });
      expect(mismatches).toBe(0);
    });
  }
});
