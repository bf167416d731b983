import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { scanImage, scanScales } from '../../src/detect/scan-image.js';
import { enumerateFeatures } from '../../src/features/enumerate-features.js';
import { evaluateNormalizedFeature } from '../../src/features/evaluate-feature.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { randomGrayImage } from '../helpers/random-image.js';

describe('scan against a brute-force twin', () => {
  it('accepts exactly the windows that per-window evaluateNormalizedFeature (scaledFeatureCells) accepts, at every scale', () => {
    const random = seedrandom('brute');
    const features = enumerateFeatures(12, 10);
    const model: CascadeModel = {
      format: 'rectboost-cascade', version: 1, window: { width: 12, height: 10 }, normalization: 'window-standard-deviation', featureSet: 'basic',
      stages: [2, 4].map((size) => ({
        threshold: 0,
        weakClassifiers: Array.from({ length: size }, () => ({ feature: features[Math.floor(random() * features.length)]!, splitValue: random() - 0.5, belowOutput: -random(), aboveOutput: random() })),
      })),
    };
    const image = randomGrayImage(50, 40, 'brute-image');
    const integral = computeIntegralImage(image);
    const options = { scaleStep: 1.3, shift: 1.5 };
    const { hits } = scanImage(detectorCascadeFromModel(model), integral, options);
    const expected: string[] = [];
    for (const scale of scanScales({ windowWidth: 12, windowHeight: 10 }, 50, 40, options)) {
      const width = Math.round(12 * scale);
      const height = Math.round(10 * scale);
      const step = Math.max(1, Math.round(1.5 * scale));
      for (let y = 0; y + height <= 40; y += step) {
        for (let x = 0; x + width <= 50; x += step) {
          const accepted = model.stages.every((stage) => {
            let score = 0;
            for (const weak of stage.weakClassifiers) {
              score += evaluateNormalizedFeature(integral, weak.feature, x, y, 12, 10, scale) < weak.splitValue ? weak.belowOutput : weak.aboveOutput;
            }
            return score >= stage.threshold;
          });
          if (accepted) expected.push(`${x},${y},${width},${height}`);
        }
      }
    }
    const found = Array.from({ length: hits.count }, (_, i) => `${hits.x[i]},${hits.y[i]},${hits.width[i]},${hits.height[i]}`);
    expect(expected.length).toBeGreaterThan(20);
    expect(found.sort()).toEqual(expected.sort());
  });
});
