import { RectboostError } from '../errors.js';
import type { WeightedRectangle } from './haar-feature.js';

/**
 * Adds a weighted rectangle's four table reads to `corners` (table entry → coefficient),
 * merging reads that neighbouring rectangles share. Entries are relative to the
 * window's top-left corner of the upright table, of row stride `stride`:
 *
 * - upright {x, y, width, height} (Crow 1984): +S(x+w, y+h) − S(x, y+h) − S(x+w, y) + S(x, y);
 * - tilted (tiltedRectangleSum): +T(bottom) − T(left) − T(right) + T(top), read on the
 *   rotated table at the constant distance `rotatedAt` from the upright one.
 *
 * @throws RectboostError `invalid-option` for a tilted rectangle when the table has no
 *   rotated part (`rotatedAt` undefined): build it with `{ rotated: true }`.
 */
export function addRectangleCorners(corners: Map<number, number>, rectangle: WeightedRectangle, stride: number, rotatedAt: number | undefined): void {
  const { x, y, width, height, weight } = rectangle;
  if (rectangle.tilted !== true) {
    addCorner(corners, (y + height) * stride + x + width, weight);
    addCorner(corners, (y + height) * stride + x, -weight);
    addCorner(corners, y * stride + x + width, -weight);
    addCorner(corners, y * stride + x, weight);
    return;
  }
  if (rotatedAt === undefined) {
    throw new RectboostError('invalid-option', 'A tilted feature needs the rotated summed-area table; build the tables with { rotated: true } (extended feature set).');
  }
  addCorner(corners, rotatedAt + (y + width + height) * stride + x + width - height, weight);
  addCorner(corners, rotatedAt + (y + height) * stride + x - height, -weight);
  addCorner(corners, rotatedAt + (y + width) * stride + x + width, -weight);
  addCorner(corners, rotatedAt + y * stride + x, weight);
}

/** The merged reads in ascending entry order, without those whose coefficients cancelled. */
export function sortedCorners(corners: Map<number, number>): Array<[number, number]> {
  return [...corners.entries()].filter(([, coefficient]) => coefficient !== 0).sort((a, b) => a[0] - b[0]);
}

function addCorner(corners: Map<number, number>, offset: number, weight: number): void {
  corners.set(offset, (corners.get(offset) ?? 0) + weight);
}
