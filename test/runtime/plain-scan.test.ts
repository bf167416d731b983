import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parseCascadeModel } from '../../src/cascade/model-json.js';
import { detectorCascadeFromModel, type DetectorCascade } from '../../src/detect/detector-cascade.js';
import { scanImage, type ScanOptions, type ScanResult } from '../../src/detect/scan-image.js';
import { computeIntegralImage, type IntegralImage } from '../../src/image/integral-image.js';
import { createGrayImage } from '../../src/image/gray-image.js';
import { decodeGrayImageFile } from '../../src/io/decode-image.js';
import { scanImagePlain } from '../../src/runtime/plain-scan.js';
import { detect, grayFromRgba, loadDetector, scanKernelAvailable } from '../../src/runtime/index.js';
import { exportRuntimeCascade } from '../../src/cascade/runtime-export.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { randomCascadeModel } from '../helpers/scan-twin.js';

// The runtime's plain-JS scan must give the WebAssembly kernel's bits: the same
// hits in the same order, the same scores (compared as bit patterns) and counters.
const MODEL = fileURLToPath(new URL('../fixtures/demo-cascade.json', import.meta.url));
const demo = detectorCascadeFromModel(parseCascadeModel(readFileSync(MODEL, 'utf8'), MODEL));

function expectSameScan(cascade: DetectorCascade, integral: IntegralImage, options: ScanOptions): ScanResult {
  const kernel = scanImage(cascade, integral, options);
  const plain = scanImagePlain(cascade, integral, options);
  expect(plain.statistics).toEqual(kernel.statistics);
  expect(plain.hits.count).toBe(kernel.hits.count);
  for (const field of ['x', 'y', 'width', 'height'] as const) expect(plain.hits[field]).toEqual(kernel.hits[field]);
  // toEqual on Float64Array treats 0 and −0 alike; the bytes do not.
  expect(new Uint8Array(plain.hits.score.buffer)).toEqual(new Uint8Array(kernel.hits.score.buffer));
  return kernel;
}

describe('plain-JS scan equals the WebAssembly kernel', () => {
  it('on demo panel p01 with the demo cascade, at the default and at other scan options', async () => {
    const integral = computeIntegralImage(await decodeGrayImageFile(fileURLToPath(new URL('../../demo-patches/scenes/p01.png', import.meta.url))));
    const first = expectSameScan(demo, integral, {});
    expect(first.hits.count).toBeGreaterThan(1000);
    expectSameScan(demo, integral, { scaleStep: 1.1, shift: 2, smallestSide: 30, largestSide: 200 });
  });

  it('on random cascades of every stage shape over random images (shift 1 and 1.5)', () => {
    for (const [seed, stages] of [['a', [1]], ['b', [2, 3]], ['c', [1, 1, 4]], ['d', [6, 2, 1, 3]]] as const) {
      const cascade = detectorCascadeFromModel(randomCascadeModel(seed, [...stages]));
      const integral = computeIntegralImage(randomGrayImage(61, 47, `image-${seed}`));
      const scan = expectSameScan(cascade, integral, { scaleStep: 1.2 });
      expect(scan.hits.count + scan.statistics.rejectedAtStage.reduce((n, k) => n + k, 0)).toBe(scan.statistics.windowsScanned - scan.statistics.flatWindows);
      expectSameScan(cascade, integral, { scaleStep: 1.3, shift: 1.5 });
    }
  });

  it('with no stages (every non-flat window accepted, score 0) and on a flat image (no window scanned past σ)', () => {
    const empty: DetectorCascade = { windowWidth: 8, windowHeight: 6, stages: [] };
    const noisy = computeIntegralImage(randomGrayImage(30, 20, 'empty'));
    expect(expectSameScan(empty, noisy, {}).hits.count).toBeGreaterThan(0);
    const flat = computeIntegralImage(createGrayImage(40, 30, new Uint8Array(1200).fill(90)));
    const scan = expectSameScan(demo, flat, {});
    expect(scan.statistics.flatWindows).toBe(scan.statistics.windowsScanned);
  });
});

describe('runtime detect', () => {
  it('gives the same detections with either engine, from a gray buffer or from RGBA pixels of the same gray values', async () => {
    const image = await decodeGrayImageFile(fileURLToPath(new URL('../../demo-patches/scenes/p02.png', import.meta.url)));
    const detector = loadDetector(JSON.stringify(exportRuntimeCascade(parseCascadeModel(readFileSync(MODEL, 'utf8'), MODEL))));
    const rgba = new Uint8ClampedArray(4 * image.data.length);
    image.data.forEach((v, i) => rgba.set([v, v, v, 255], 4 * i));
    const merge = { method: 'mean', minSupport: 3 } as const;
    const kernel = detect(detector, image, { merge, engine: 'kernel' });
    const plain = detect(detector, { width: image.width, height: image.height, data: rgba }, { merge, engine: 'plain' });
    expect(kernel.engine).toBe('kernel');
    expect(plain.engine).toBe('plain');
    expect(plain.detections).toEqual(kernel.detections);
    expect(kernel.detections.length).toBeGreaterThan(5);
    // Node 20 has WebAssembly SIMD, so 'auto' takes the kernel here.
    expect(scanKernelAvailable()).toBe(true);
    expect(detect(detector, image, { merge }).engine).toBe('kernel');
  });

  it('turns RGBA into gray with BT.601 luma weights, rounding halves up', () => {
    // 0.299·255 = 76.245 → 76; 0.587·255 = 149.685 → 150; 0.114·255 = 29.07 → 29; (10, 20, 30) → 18.15 → 18.
    const pixels = new Uint8ClampedArray([255, 0, 0, 0, 0, 255, 0, 0, 0, 0, 255, 0, 10, 20, 30, 255]);
    expect([...grayFromRgba({ width: 4, height: 1, data: pixels }).data]).toEqual([76, 150, 29, 18]);
    expect(() => grayFromRgba({ width: 3, height: 1, data: pixels })).toThrow(/4 · width · height/);
  });

  it('refuses a cascade that is not valid JSON, naming it', () => {
    expect(() => loadDetector('{"format":', 'cascade.json')).toThrow(/cascade.json is not valid JSON/);
  });
});
