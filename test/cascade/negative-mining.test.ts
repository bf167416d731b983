import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import type { CascadeModel, Stage } from '../../src/cascade/cascade-model.js';
import { BackgroundWindows, mineHardNegatives, sampleUniformNegatives } from '../../src/cascade/negative-mining.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { WindowListEvaluator } from '../../src/detect/window-list.js';
import { cropGrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { windowInverseDeviation } from '../../src/image/window-statistics.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { twinDepth, twinStagesPassed } from '../helpers/window-twin.js';

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
    expect(twinStagesPassed(cascade, mined.negatives).every((p) => p === 1)).toBe(true);
    // Accepted windows are a strict subset: scanning took more windows than it kept.
    expect(mined.windowsScanned).toBeGreaterThan(50);
  });

  it('reports exhaustion after visiting every window exactly once', () => {
    const mined = mineHardNegatives(backgrounds, cascade, 1_000_000, seedrandom('x'));
    expect(mined.exhausted).toBe(true);
    expect(mined.windowsScanned).toBe(backgrounds.totalWindows);
    // Brute force: the twin on every window of every level.
    let accepted = 0;
    backgrounds.sheets.forEach((_, sheetIndex) => {
      const image = backgrounds.level(sheetIndex);
      for (let y = 0; y + 6 <= image.height; y++) for (let x = 0; x + 8 <= image.width; x++) if (twinDepth(cascade, cropGrayImage(image, x, y, 8, 6)).stagesPassed === 1) accepted++;
    });
    expect(mined.negatives.length).toBe(accepted);
    expect(mined.windowsEvaluated).toBe(backgrounds.totalWindows);
  });
});

describe('window lists on a background table', () => {
  it('accept exactly the windows the twin accepts on their crops, flat windows never', () => {
    const image = randomGrayImage(30, 20, 'agree');
    // A flat 9×7 patch: windows inside it are flat and must be rejected unlisted.
    for (let y = 2; y < 9; y++) image.data.fill(77, y * 30 + 3, y * 30 + 12);
    const integral = computeIntegralImage(image);
    const entries: number[] = [];
    const inverses: number[] = [];
    const expected: number[] = [];
    let flat = 0;
    for (let y = 0; y + 6 <= 20; y++) {
      for (let x = 0; x + 8 <= 30; x++) {
        const twin = twinDepth(cascade, cropGrayImage(image, x, y, 8, 6));
        const inverse = windowInverseDeviation(integral, x, y, 8, 6);
        if (inverse === 0) {
          flat++;
          expect(twin.stagesPassed).toBe(0);
          continue;
        }
        entries.push(y * integral.stride + x);
        inverses.push(inverse);
        expected.push(twin.stagesPassed);
      }
    }
    expect(flat).toBeGreaterThan(0);
    const evaluator = new WindowListEvaluator(detectorCascadeFromModel(cascade), integral, entries.length);
    const accepted = new Uint8Array(entries.length);
    const passed = evaluator.accept(entries, inverses, entries.length, accepted);
    evaluator.release();
    expect(Array.from(accepted)).toEqual(expected);
    expect(passed).toBe(expected.filter((p) => p === 1).length);
    expect(passed).toBeGreaterThan(0);
    expect(passed).toBeLessThan(entries.length);
  });
});
