import { describe, expect, it } from 'vitest';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { createScanPool } from '../../src/parallel/scan-pool.js';
import { handBuiltCascade, syntheticScene } from '../helpers/synthetic-scene.js';
import { randomGrayImage } from '../helpers/random-image.js';

describe('scan pool', () => {
  it('gives the same hits and counters on 2 worker threads as on the calling thread', async () => {
    const cascade = detectorCascadeFromModel(handBuiltCascade());
    const images = [syntheticScene().image, randomGrayImage(64, 48, 'pool-a'), randomGrayImage(40, 90, 'pool-b')];
    const inline = createScanPool(cascade, 0);
    const threaded = createScanPool(cascade, 2);
    try {
      const expected = await Promise.all(images.map((image) => inline.scan(image, { scaleStep: 1.3 })));
      const actual = await Promise.all(images.map((image) => threaded.scan(image, { scaleStep: 1.3 })));
      for (let i = 0; i < images.length; i++) {
        expect(actual[i]!.hits).toEqual(expected[i]!.hits);
        expect(actual[i]!.statistics).toEqual(expected[i]!.statistics);
      }
      expect(expected[0]!.hits.count).toBeGreaterThan(0);
    } finally {
      await threaded.close();
      await inline.close();
    }
  });
});
