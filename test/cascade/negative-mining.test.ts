import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import type { CascadeModel, Stage } from '../../src/cascade/cascade-model.js';
import { BackgroundWindows, mineHardNegatives, sampleUniformNegatives } from '../../src/cascade/negative-mining.js';
import { stagesPassed } from '../../src/cascade/stage-score.js';
import { compileCascade, countStagesPassed } from '../../src/cascade/window-classifier.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { cropGrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { randomGrayImage } from '../helpers/random-image.js';

// A hand-built stage: accepts windows whose left half is brighter than the right half
// by more than 0.3 σ (a two-horizontal feature over the whole 8×6 window).
const brighterLeft: Stage = {
  threshold: 0.5,
  weakClassifiers: [{ feature: { kind: 'two-horizontal', x: 0, y: 0, cellWidth: 4, cellHeight: 6 }, splitValue: 0.3 * 24, belowOutput: 0, aboveOutput: 1 }],
};
const cascade: Pick<CascadeModel, 'window' | 'stages'> = { window: { width: 8, height: 6 }, stages: [brighterLeft] };

describe('background windows', () => {
  const images = [randomGrayImage(40, 30, 'bg-a'), randomGrayImage(17, 9, 'bg-b')];
  const backgrounds = new BackgroundWindows(images, 8, 6);

  it('counts every position at every pyramid level (1.25^k while the window fits)', () => {
    // Brute-force twin of the count: level k is ⌊w/1.25^k⌋ × ⌊h/1.25^k⌋.
    let expected = 0;
    for (const image of images) {
      for (let k = 0; ; k++) {
        const w = Math.floor(image.width / 1.25 ** k);
        const h = Math.floor(image.height / 1.25 ** k);
        if (w < 8 || h < 6) break;
        expected += (w - 7) * (h - 5);
      }
    }
    expect(backgrounds.totalWindows).toBe(expected);
  });

  it('draws stage-1 negatives uniformly without repeats, the same for the same seed', () => {
    const first = sampleUniformNegatives(backgrounds, 300, seedrandom('s'));
    const again = sampleUniformNegatives(backgrounds, 300, seedrandom('s'));
    expect(first.negatives).toHaveLength(300);
    expect(first.exhausted).toBe(false);
    expect(again.negatives.map((n) => Buffer.from(n.data).toString('hex'))).toEqual(first.negatives.map((n) => Buffer.from(n.data).toString('hex')));
  });

  it('mines only windows that the cascade so far accepts', () => {
    const mined = mineHardNegatives(backgrounds, cascade, 50, seedrandom('m'));
    expect(mined.negatives.length).toBe(50);
    const passed = stagesPassed(cascade, packWindowSamples(mined.negatives, 8, 6));
    expect(Array.from(passed).every((p) => p === 1)).toBe(true);
    // Accepted windows are a strict subset: scanning took more windows than it kept.
    expect(mined.windowsScanned).toBeGreaterThan(50);
  });

  it('reports exhaustion after visiting every window exactly once', () => {
    const mined = mineHardNegatives(backgrounds, cascade, 1_000_000, seedrandom('x'));
    expect(mined.exhausted).toBe(true);
    expect(mined.windowsScanned).toBe(backgrounds.totalWindows);
    // Brute force: count accepted windows level by level.
    let accepted = 0;
    backgrounds.sheets.forEach((_, sheetIndex) => {
      const { image, integral } = backgrounds.level(sheetIndex);
      const compiled = compileCascade(cascade, integral.stride);
      for (let y = 0; y + 6 <= image.height; y++) for (let x = 0; x + 8 <= image.width; x++) if (countStagesPassed(compiled, integral, x, y) === 1) accepted++;
    });
    expect(mined.negatives.length).toBe(accepted);
  });
});

describe('window classifier', () => {
  it('agrees with scale-1 stage scoring on cropped windows (same σ, same sums)', () => {
    const image = randomGrayImage(30, 20, 'agree');
    const integral = computeIntegralImage(image);
    const compiled = compileCascade(cascade, integral.stride);
    const crops = [];
    const direct = [];
    for (let y = 0; y + 6 <= 20; y += 3) {
      for (let x = 0; x + 8 <= 30; x += 2) {
        crops.push(cropGrayImage(image, x, y, 8, 6));
        direct.push(countStagesPassed(compiled, integral, x, y));
      }
    }
    expect(Array.from(stagesPassed(cascade, packWindowSamples(crops, 8, 6)))).toEqual(direct);
  });

  it('a cascade with no stages accepts every window; flat windows fail a non-empty cascade', () => {
    const flat = computeIntegralImage({ width: 10, height: 10, data: new Uint8Array(100).fill(9) });
    expect(countStagesPassed(compileCascade({ window: { width: 8, height: 6 }, stages: [] }, 11), flat, 0, 0)).toBe(0);
    expect(stagesPassed({ stages: [] }, packWindowSamples([randomGrayImage(8, 6, 'any')], 8, 6))[0]).toBe(0);
    expect(countStagesPassed(compileCascade(cascade, 11), flat, 1, 1)).toBe(0);
  });
});
