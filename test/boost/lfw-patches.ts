import { existsSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { readNpyFloat64 } from '../../src/data/npy-reader.js';
import type { GrayImage } from '../../src/image/gray-image.js';

/**
 * scikit-image's lfw_subset.npy (Debian python3-skimage; fetched into reference-data/ by
 * scripts/fetch-reference-data.sh): 200 patches of 25×25 float64 in [0, 1], the first 100
 * faces from Labeled Faces in the Wild, the last 100 non-faces (skimage.data.lfw_subset docs).
 */
export const LFW_PATH = fileURLToPath(new URL('../../reference-data/lfw_subset.npy', import.meta.url));

/**
 * True when the file is there. Under CI (process.env.CI) a missing file throws, so the
 * suite fails instead of silently skipping; elsewhere the caller skips.
 */
export function lfwAvailable(): boolean {
  if (existsSync(LFW_PATH)) return true;
  if (process.env.CI) throw new Error(`${LFW_PATH} is missing; CI must run scripts/fetch-reference-data.sh first.`);
  return false;
}

/** The patches as 8-bit images (round(v · 255)), split: even indices train, odd test. */
export function loadLfwPatches(): { trainFaces: GrayImage[]; testFaces: GrayImage[]; trainOthers: GrayImage[]; testOthers: GrayImage[] } {
  const { shape, data } = readNpyFloat64(readFileSync(LFW_PATH), LFW_PATH);
  if (shape.join('x') !== '200x25x25') throw new Error(`Expected lfw_subset.npy of shape 200x25x25; it is ${shape.join('x')}.`);
  const image = (index: number): GrayImage => {
    const pixels = new Uint8Array(625);
    for (let k = 0; k < 625; k++) pixels[k] = Math.round(data[index * 625 + k]! * 255);
    return { width: 25, height: 25, data: pixels };
  };
  const pick = (first: number, parity: number): GrayImage[] => Array.from({ length: 50 }, (_, j) => image(first + 2 * j + parity));
  return { trainFaces: pick(0, 0), testFaces: pick(0, 1), trainOthers: pick(100, 0), testOthers: pick(100, 1) };
}
