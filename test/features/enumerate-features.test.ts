import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { BASIC_FEATURE_KINDS, type BasicFeatureKind } from '../../src/features/feature-kind.js';
import { countFeatures, countFeaturesOfKind, enumerateFeatures } from '../../src/features/enumerate-features.js';
import { featureFitsWindow } from '../../src/features/haar-feature.js';

interface CountFixture {
  libraryVersion: string;
  counts: Array<{ width: number; height: number; perType: Record<string, number> }>;
}
const fixture = JSON.parse(readFileSync(new URL('../fixtures/skimage-haar-features.json', import.meta.url), 'utf8')) as CountFixture;

// Explicit mapping between scikit-image's type names and ours.
const SKIMAGE_TYPE: Record<BasicFeatureKind, string> = {
  'two-horizontal': 'type-2-x',
  'two-vertical': 'type-2-y',
  'three-horizontal': 'type-3-x',
  'three-vertical': 'type-3-y',
  'four-diagonal': 'type-4',
};

describe('feature enumeration', () => {
  it('finds 162,336 basic features in a 24×24 window (Wang 2014, IPOL, §2.2)', () => {
    expect(countFeatures(24, 24)).toBe(162_336);
    expect(enumerateFeatures(24, 24)).toHaveLength(162_336);
  });

  it(`matches scikit-image ${fixture.libraryVersion} haar_like_feature_coord counts per type and window size`, () => {
    for (const { width, height, perType } of fixture.counts) {
      for (const kind of BASIC_FEATURE_KINDS) {
        expect(countFeaturesOfKind(kind, width, height), `${kind} in ${width}×${height}`).toBe(perType[SKIMAGE_TYPE[kind]]);
      }
    }
  });

  it('enumerates exactly the closed-form count, every feature inside the window, none twice', () => {
    const features = enumerateFeatures(11, 7);
    expect(features).toHaveLength(countFeatures(11, 7));
    expect(features.every((feature) => featureFitsWindow(feature, 11, 7))).toBe(true);
    const keys = new Set(features.map((f) => `${f.kind}/${f.x}/${f.y}/${f.cellWidth}/${f.cellHeight}`));
    expect(keys.size).toBe(features.length);
  });

  it('refuses windows larger than the supported side', () => {
    expect(() => enumerateFeatures(65, 24)).toThrow(/window width must be an integer from 1 to 64/);
  });
});
