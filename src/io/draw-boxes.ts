import type { GrayImage } from '../image/gray-image.js';
import type { Box } from '../metrics/intersection-over-union.js';
import type { RgbImage } from './encode-image.js';

/** An RGB colour, 0..255 per channel. */
export type RgbColour = readonly [red: number, green: number, blue: number];

/** Detection outline colour: a saturated amber that stands out on gray photos. */
export const DETECTION_COLOUR: RgbColour = [255, 170, 0];
/** Ground-truth outline colour (when drawn): a cyan-green, distinct from DETECTION_COLOUR. */
export const TRUTH_COLOUR: RgbColour = [0, 200, 160];

/**
 * A gray image as RGB with box outlines drawn over it (pure; no file I/O).
 * Boxes are rounded to whole pixels and clipped to the image; each outline is
 * `thickness` pixels wide (default 2), drawn inside the box.
 * @example encodeRgbPng(drawBoxes(image, [{ boxes: detections.map((d) => d.box), colour: DETECTION_COLOUR }]))
 */
export function drawBoxes(image: GrayImage, layers: ReadonlyArray<{ boxes: readonly Box[]; colour: RgbColour }>, thickness = 2): RgbImage {
  const { width, height } = image;
  const data = new Uint8Array(width * height * 3);
  for (let i = 0; i < width * height; i++) {
    const v = image.data[i]!;
    data[3 * i] = v;
    data[3 * i + 1] = v;
    data[3 * i + 2] = v;
  }
  const paint = (x: number, y: number, colour: RgbColour): void => {
    if (x < 0 || y < 0 || x >= width || y >= height) return;
    const at = 3 * (y * width + x);
    data[at] = colour[0];
    data[at + 1] = colour[1];
    data[at + 2] = colour[2];
  };
  for (const { boxes, colour } of layers) {
    for (const box of boxes) {
      const left = Math.round(box[0]);
      const top = Math.round(box[1]);
      const right = Math.round(box[0] + box[2]) - 1;
      const bottom = Math.round(box[1] + box[3]) - 1;
      for (let t = 0; t < thickness; t++) {
        for (let x = left; x <= right; x++) {
          paint(x, top + t, colour);
          paint(x, bottom - t, colour);
        }
        for (let y = top; y <= bottom; y++) {
          paint(left + t, y, colour);
          paint(right - t, y, colour);
        }
      }
    }
  }
  return { width, height, data };
}
