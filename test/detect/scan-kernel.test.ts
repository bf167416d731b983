import { readFileSync } from 'node:fs';
import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { SCAN_KERNEL_BASE64 } from '../../src/detect/scan-kernel-binary.js';
import { scanImage } from '../../src/detect/scan-image.js';
import { createGrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { hitStrings, randomCascadeModel, scanTwin } from '../helpers/scan-twin.js';

// The scan kernel (src/detect/scan-kernel.wat) takes windows four at a time,
// straight from the row at a one-pixel shift and from a compacted list
// otherwise. These cases aim at its seams: rows whose window count is not a
// multiple of four, lists with gaps (flat windows), the last row of the table,
// stages without classifiers, and reuse of its memory across images.

function expectSameAsTwin(model: CascadeModel, image: ReturnType<typeof randomGrayImage>, options: Parameters<typeof scanImage>[2]): void {
  const integral = computeIntegralImage(image);
  const { hits, statistics } = scanImage(detectorCascadeFromModel(model), integral, options);
  const twin = scanTwin(model, integral, options);
  expect(hitStrings(hits)).toEqual(twin.hits.sort());
  const { scales: _scales, ...counters } = statistics;
  expect(counters).toEqual(twin.statistics);
}

describe('scan kernel', () => {
  it('is built from its source: the committed bytes equal a fresh compile of scan-kernel.wat (node scripts/build-scan-kernel.js)', async () => {
    // @ts-expect-error the build script is plain JavaScript without types
    const { compileScanKernel } = await import('../../scripts/build-scan-kernel.js');
    const source = readFileSync(new URL('../../src/detect/scan-kernel.wat', import.meta.url), 'utf8');
    const bytes = (await compileScanKernel(source)) as Uint8Array;
    expect(Buffer.from(bytes).toString('base64')).toBe(SCAN_KERNEL_BASE64);
  });

  it('handles rows of 1 to 9 windows, at one- and two-pixel shifts (every tail of a group of four)', () => {
    const model = randomCascadeModel('tails', [2, 3, 2]);
    for (let extra = 0; extra <= 8; extra++) {
      const image = randomGrayImage(12 + extra, 14, `tails-${extra}`);
      for (const shift of [1, 2]) expectSameAsTwin(model, image, { shift, largestSide: 12 });
    }
  });

  it('matches the twin across scales on a wide image (rows long enough for many groups)', () => {
    const model = randomCascadeModel('wide', [2, 4, 3, 5]);
    expectSameAsTwin(model, randomGrayImage(97, 41, 'wide'), { scaleStep: 1.2, shift: 1 });
  });

  it('skips flat windows wherever they fall in a row, leaving gaps in the list', () => {
    // Random pixels with flat (constant) blocks: windows inside a block are flat,
    // the rest are not, so the listed windows are not adjacent.
    const random = seedrandom('flat-blocks');
    const width = 60;
    const height = 36;
    const data = new Uint8Array(width * height);
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        const inBlock = (x >= 5 && x < 22 && y >= 3 && y < 20) || (x >= 30 && x < 55 && y >= 12 && y < 34);
        data[y * width + x] = inBlock ? 90 : Math.floor(random() * 256);
      }
    }
    const image = createGrayImage(width, height, data);
    const model = randomCascadeModel('flat-model', [2, 3, 3]);
    for (const shift of [1, 2]) {
      const integral = computeIntegralImage(image);
      const { statistics } = scanImage(detectorCascadeFromModel(model), integral, { shift, largestSide: 12 });
      expect(statistics.flatWindows).toBeGreaterThan(20);
      expectSameAsTwin(model, image, { shift, largestSide: 12 });
    }
  });

  it('without stages accepts every window that is not flat, with score 0', () => {
    const model: CascadeModel = { ...randomCascadeModel('none', []) };
    for (const shift of [1, 2]) expectSameAsTwin(model, randomGrayImage(23, 17, 'no-stages'), { shift });
  });

  it('a stage without weak classifiers passes every window when its threshold is ≤ 0 and none when it is > 0', () => {
    const model = randomCascadeModel('empty-stage', [2, 3]);
    const integral = computeIntegralImage(randomGrayImage(30, 20, 'empty-stage'));
    const cascade = detectorCascadeFromModel(model);
    for (const shift of [1, 2]) {
      const plain = scanImage(cascade, integral, { shift });
      const passing = scanImage({ ...cascade, stages: [{ threshold: 0, weakClassifiers: [] }, ...cascade.stages] }, integral, { shift });
      const blocking = scanImage({ ...cascade, stages: [...cascade.stages.slice(0, 1), { threshold: 1, weakClassifiers: [] }, ...cascade.stages.slice(1)] }, integral, { shift });
      expect(hitStrings(passing.hits)).toEqual(hitStrings(plain.hits));
      expect(blocking.hits.count).toBe(0);
      expect(blocking.statistics.rejectedAtStage[1]).toBe(plain.statistics.windowsScanned - plain.statistics.rejectedAtStage[0]!);
    }
  });

  it('gives the same result for an image scanned before and after a larger one (memory reused and regrown)', () => {
    const model = randomCascadeModel('reuse', [2, 3]);
    const cascade = detectorCascadeFromModel(model);
    const small = computeIntegralImage(randomGrayImage(40, 30, 'reuse-small'));
    const before = hitStrings(scanImage(cascade, small, {}).hits);
    scanImage(cascade, computeIntegralImage(randomGrayImage(700, 500, 'reuse-large')), {});
    expect(hitStrings(scanImage(cascade, small, {}).hits)).toEqual(before);
    expect(before).toEqual(scanTwin(model, small, {}).hits.sort());
  });
});
