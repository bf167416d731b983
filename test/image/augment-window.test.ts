import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { applyAugmentation, augmentWindows, DEFAULT_AUGMENTATION, drawAugmentation, type AugmentationDraw } from '../../src/image/augment-window.js';
import type { GrayImage } from '../../src/image/gray-image.js';
import { randomGrayImage as randomImage } from '../helpers/random-image.js';

const NONE: AugmentationDraw = { shiftX: 0, shiftY: 0, scale: 1, rotationRadians: 0, contrast: 1, brightness: 0 };
const at = (image: GrayImage, x: number, y: number): number =>
  image.data[Math.min(image.height - 1, Math.max(0, y)) * image.width + Math.min(image.width - 1, Math.max(0, x))]!;

describe('augmented positives', () => {
  it('leaves a window unchanged under the identity transform (every sample falls on a pixel centre)', () => {
    for (const [w, h] of [[24, 24], [13, 9]] as const) {
      const image = randomImage(w, h, `identity-${w}`);
      expect(Array.from(applyAugmentation(image, NONE).data)).toEqual(Array.from(image.data));
    }
  });

  it('moves content by a whole-pixel shift and repeats the border, as a brute-force copy does', () => {
    const image = randomImage(11, 7, 'shift');
    const out = applyAugmentation(image, { ...NONE, shiftX: 2, shiftY: -1 });
    // Output (u, v) samples the source at (u − 2, v + 1), clamped to the window.
    for (let v = 0; v < 7; v++) for (let u = 0; u < 11; u++) expect(out.data[v * 11 + u]).toBe(at(image, u - 2, v + 1));
  });

  it('rotates a square window by 90° about its centre exactly like index arithmetic (odd and even sides)', () => {
    for (const side of [9, 10]) {
      const image = randomImage(side, side, `rotate-${side}`);
      const out = applyAugmentation(image, { ...NONE, rotationRadians: Math.PI / 2 });
      // Derivation: with c = side/2 the inverse map sends pixel centre (u, v) to (v, side − 1 − u).
      for (let v = 0; v < side; v++) for (let u = 0; u < side; u++) expect(out.data[v * side + u]).toBe(at(image, v, side - 1 - u));
    }
  });

  it('maps gray levels by contrast about 128 plus brightness, rounded and clipped', () => {
    const flat = (level: number): GrayImage => ({ width: 4, height: 4, data: new Uint8Array(16).fill(level) });
    const draw = { ...NONE, contrast: 1.5, brightness: 10 };
    expect(applyAugmentation(flat(100), draw).data[0]).toBe(Math.round(1.5 * (100 - 128) + 138)); // 96
    expect(applyAugmentation(flat(250), draw).data[0]).toBe(255); // 1.5·122 + 138 = 321, clipped
    expect(applyAugmentation(flat(10), draw).data[0]).toBe(0); // 1.5·(−118) + 138 = −39, clipped
  });

  it('draws every parameter within its limits, and scale and contrast on both sides of 1', () => {
    const random = seedrandom('limits');
    const draws = Array.from({ length: 2000 }, () => drawAugmentation(random, 24, 20));
    const limits = DEFAULT_AUGMENTATION;
    for (const d of draws) {
      expect(Math.abs(d.shiftX)).toBeLessThanOrEqual(limits.shiftShare * 24);
      expect(Math.abs(d.shiftY)).toBeLessThanOrEqual(limits.shiftShare * 20);
      expect(Math.abs(Math.log(d.scale))).toBeLessThanOrEqual(Math.log(limits.maxScale) + 1e-12);
      expect(Math.abs(d.rotationRadians)).toBeLessThanOrEqual((limits.maxRotationDegrees * Math.PI) / 180);
      expect(Math.abs(Math.log(d.contrast))).toBeLessThanOrEqual(Math.log(limits.maxContrast) + 1e-12);
      expect(Math.abs(d.brightness)).toBeLessThanOrEqual(limits.maxBrightness);
    }
    expect(draws.some((d) => d.scale < 1) && draws.some((d) => d.scale > 1)).toBe(true);
    expect(draws.some((d) => d.contrast < 1) && draws.some((d) => d.contrast > 1)).toBe(true);
  });

  it('gives the same copies for the same seed, copies × windows of them, and leaves the inputs alone', () => {
    const windows = [randomImage(12, 12, 'a'), randomImage(12, 12, 'b')];
    const before = windows.map((w) => Array.from(w.data));
    const first = augmentWindows(windows, 3, seedrandom('seed-1'));
    const again = augmentWindows(windows, 3, seedrandom('seed-1'));
    const other = augmentWindows(windows, 3, seedrandom('seed-2'));
    expect(first).toHaveLength(6);
    expect(first.map((w) => Array.from(w.data))).toEqual(again.map((w) => Array.from(w.data)));
    expect(first.map((w) => Array.from(w.data))).not.toEqual(other.map((w) => Array.from(w.data)));
    expect(windows.map((w) => Array.from(w.data))).toEqual(before);
    expect(augmentWindows(windows, 0, seedrandom('x'))).toEqual([]);
    expect(() => augmentWindows(windows, 1.5, seedrandom('x'))).toThrow(/augmented copies must be an integer from 0 to 100/);
  });
});
