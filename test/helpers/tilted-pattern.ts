import type { GrayImage } from '../../src/image/gray-image.js';

/**
 * Invented test data (not reference data) for the extended features: the object is a
 * bright bar turned by exactly 45° (running down-right), its centre line anywhere within
 * ±SPREAD pixels of the window's centre, on a noisy mid-gray patch; the look-alikes are
 * the same bar turned 15°–35° further either way. Seeded.
 */
const SPREAD = 4;
const ANGLE_MIN = 15;
const ANGLE_RANGE = 20;

function bar(size: number, random: () => number, angle: number): GrayImage {
  const data = new Uint8Array(size * size);
  const offset = (random() - 0.5) * 2 * SPREAD;
  const halfWidth = 1.0 + random() * 0.6;
  const base = 70 + random() * 60;
  const contrast = 45 + random() * 50;
  const [nx, ny] = [Math.sin(angle), -Math.cos(angle)];
  const centre = size / 2;
  for (let y = 0; y < size; y++) {
    for (let x = 0; x < size; x++) {
      const distance = Math.abs((x + 0.5 - centre) * nx + (y + 0.5 - centre) * ny - offset);
      data[y * size + x] = clampByte(base + (distance < halfWidth ? contrast : 0) + (random() - 0.5) * 60);
    }
  }
  return { width: size, height: size, data };
}
/** The object: a 45° bar (see above). */
export function tiltedBar(size: number, random: () => number): GrayImage {
  return bar(size, random, Math.PI / 4);
}
/** A look-alike: the bar at 45° ± 15..35°. */
export function tiltedLookAlike(size: number, random: () => number): GrayImage {
  return bar(size, random, Math.PI / 4 + (random() < 0.5 ? -1 : 1) * (Math.PI / 180) * (ANGLE_MIN + random() * ANGLE_RANGE));
}
/** A background image tiled with look-alike windows at random offsets (no object in it). */
export function tiltedBackground(width: number, height: number, size: number, random: () => number): GrayImage {
  const data = new Uint8Array(width * height);
  for (let i = 0; i < data.length; i++) data[i] = clampByte(100 + (random() - 0.5) * 60);
  for (let top = 0; top + size <= height; top += Math.floor(size * (0.5 + random() * 0.5))) {
    for (let left = 0; left + size <= width; left += Math.floor(size * (0.5 + random() * 0.5))) {
      const patch = tiltedLookAlike(size, random);
      for (let y = 0; y < size; y++) for (let x = 0; x < size; x++) data[(top + y) * width + left + x] = patch.data[y * size + x]!;
    }
  }
  return { width, height, data };
}
function clampByte(value: number): number {
  return Math.max(0, Math.min(255, Math.round(value)));
}
