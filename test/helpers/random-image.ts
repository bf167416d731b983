import seedrandom from 'seedrandom';
import { createGrayImage, type GrayImage } from '../../src/image/gray-image.js';

/** A seeded image of uniformly random 8-bit pixels (test input, not reference data). */
export function randomGrayImage(width: number, height: number, seed: string): GrayImage {
  const random = seedrandom(seed);
  const data = new Uint8Array(width * height);
  for (let i = 0; i < data.length; i++) data[i] = Math.floor(random() * 256);
  return createGrayImage(width, height, data);
}

/** Sum of pixels in a half-open rectangle by visiting every pixel: the brute-force twin of rectangleSum. */
export function bruteForceSum(image: GrayImage, x: number, y: number, width: number, height: number, power = 1): number {
  let total = 0;
  for (let row = y; row < y + height; row++) {
    for (let column = x; column < x + width; column++) total += image.data[row * image.width + column]! ** power;
  }
  return total;
}
