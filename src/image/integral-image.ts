import type { GrayImage } from './gray-image.js';

/**
 * Summed-area tables of an image and of its squared pixels
 * (Crow 1984; Viola & Jones 2001 §2.1).
 *
 * Layout: (width + 1) × (height + 1) Float64, row-major with `stride = width + 1`;
 * the first row and first column are zero, and entry (x, y) holds the sum of all
 * pixels with column < x and row < y. A half-open rectangle {x, y, w, h} then sums
 * from four corners: S(x+w, y+h) − S(x, y+h) − S(x+w, y) + S(x, y).
 *
 * Exactness: every entry is an integer. For images up to 2^26 pixels the squared
 * table is at most 2^26 · 255² < 2^42, far below 2^53, so Float64 holds every
 * sum and every four-corner difference exactly.
 */
export interface IntegralImage {
  readonly width: number;
  readonly height: number;
  /** width + 1 */
  readonly stride: number;
  /**
   * The upright table, stride · (height + 1) entries; when `rotatedAt` is set the
   * rotated table (computeRotatedSum) follows in the same array, so that corner
   * (x, y) of it is `sum[rotatedAt + y · stride + x]`.
   */
  readonly sum: Float64Array;
  readonly squaredSum: Float64Array;
  /**
   * Entries from a corner of the upright table to the same corner of the rotated
   * table inside `sum`; absent when only the upright table was built (basic
   * features need no more). Every evaluator reads a tilted corner at this constant
   * distance with the same row stride, so a tilted feature is just more corner offsets.
   */
  readonly rotatedAt?: number;
}

/** Which tables to build: `rotated` adds the rotated table for tilted features (doubles `sum`). */
export interface IntegralImageOptions {
  readonly rotated?: boolean;
}

/**
 * Builds the upright and squared tables in one pass over the image, and the
 * rotated table after the upright one when `options.rotated`. O(width · height).
 * @example computeIntegralImage(image, { rotated: cascadeUsesTiltedFeatures(cascade) })
 */
export function computeIntegralImage(image: GrayImage, options: IntegralImageOptions = {}): IntegralImage {
  const { width, height, data } = image;
  const stride = width + 1;
  const entries = stride * (height + 1);
  const rotated = options.rotated === true;
  const sum = new Float64Array(rotated ? 2 * entries : entries);
  const squaredSum = new Float64Array(stride * (height + 1));
  for (let y = 0; y < height; y++) {
    let rowSum = 0;
    let rowSquaredSum = 0;
    const source = y * width;
    const above = y * stride;
    const here = above + stride;
    for (let x = 0; x < width; x++) {
      const value = data[source + x]!;
      rowSum += value;
      rowSquaredSum += value * value;
      sum[here + x + 1] = sum[above + x + 1]! + rowSum;
      squaredSum[here + x + 1] = squaredSum[above + x + 1]! + rowSquaredSum;
    }
  }
  if (!rotated) return { width, height, stride, sum, squaredSum };
  computeRotatedSum(image, sum.subarray(entries));
  return { width, height, stride, sum, squaredSum, rotatedAt: entries };
}

/**
 * The rotated summed-area table for 45° features (Lienhart & Maydt 2002 §2.2 define
 * one; this definition and its recurrence are our own, worked out in rotated
 * coordinates). Layout as the upright table: (width + 1) × (height + 1) corners,
 * stride width + 1. Entry (x, y) holds the sum of the pixels (i, j) with
 *
 *   j < y  and  x − (y − j) ≤ i ≤ x + (y − j) − 1,
 *
 * the 45° cone of pixels above corner (x, y) (two pixels in row y − 1, four in
 * row y − 2, …), clipped to the image. In rotated coordinates u = i + j + 1,
 * v = j − i of a pixel and U = x + y, V = y − x of a corner, the cone is the
 * quadrant u ≤ U, v ≤ V, which is why a tilted rectangle sums from four corners
 * (tiltedRectangleSum), as an upright one does on the upright table.
 *
 * Recurrence, one pass top-down: T(x, y) = T(x − 1, y − 1) + A(x, y − 1) + A(x − 1, y − 1),
 * with A(i, j) = p(i, j) + A(i + 1, j − 1) the sum along the up-right ray from pixel
 * (i, j) (zero right of the image). Left of the image the cone only depends on
 * x + y, so T(−1, y − 1) = T(0, y − 2) and A(−1, y − 1) = A(0, y − 2).
 * Exact: integer sums below 2^53, as for the upright table.
 *
 * OUT: `table` (stride · (height + 1) entries, overwritten).
 */
export function computeRotatedSum(image: GrayImage, table: Float64Array): void {
  const { width, height, data } = image;
  const stride = width + 1;
  table.fill(0, 0, stride * (height + 1));
  // Up-right ray sums A of pixel row y − 2 (raysAbove) and y − 1 (rays); index i is
  // column i, with column `width` kept at zero (no pixels right of the image).
  let raysAbove = new Float64Array(stride);
  let rays = new Float64Array(stride);
  for (let y = 1; y <= height; y++) {
    const source = (y - 1) * width;
    for (let i = 0; i < width; i++) rays[i] = data[source + i]! + raysAbove[i + 1]!;
    const here = y * stride;
    const above = here - stride;
    // x = 0: the cone of (−1, y − 1) is the one of (0, y − 2), and A(−1, y − 1) = A(0, y − 2).
    table[here] = (y >= 2 ? table[above - stride]! : 0) + rays[0]! + raysAbove[0]!;
    for (let x = 1; x <= width; x++) table[here + x] = table[above + x - 1]! + rays[x]! + rays[x - 1]!;
    const spare = raysAbove;
    raysAbove = rays;
    rays = spare;
  }
}

/**
 * Sum of the pixels of the tilted rectangle with top corner (x, y), `width` cells
 * along the down-right diagonal and `height` along the down-left one, from four
 * reads of the rotated table (at `rotatedAt` in `table`):
 * T(bottom) − T(left) − T(right) + T(top), with the corners
 * top (x, y), right (x + width, y + width), left (x − height, y + height) and
 * bottom (x + width − height, y + width + height).
 *
 * Pixel set (half-open in rotated coordinates, so it tiles exactly): pixels (i, j) with
 * x + y < i + j + 1 ≤ x + y + 2·width and y − x < j − i ≤ y − x + 2·height —
 * 2 · width · height pixels, the area of the 45° rectangle. It lies in the image
 * when x − height ≥ 0, x + width ≤ image width and y + width + height ≤ image height;
 * the caller guarantees that (hot path, not checked).
 */
export function tiltedRectangleSum(table: Float64Array, rotatedAt: number, stride: number, x: number, y: number, width: number, height: number): number {
  const at = (cornerX: number, cornerY: number): number => table[rotatedAt + cornerY * stride + cornerX]!;
  return at(x + width - height, y + width + height) - at(x - height, y + height) - at(x + width, y + width) + at(x, y);
}

/**
 * Sum of a table over the half-open rectangle {x, y, width, height}; four reads.
 * The caller guarantees the rectangle lies inside the image (not checked: hot path).
 */
export function rectangleSum(table: Float64Array, stride: number, x: number, y: number, width: number, height: number): number {
  const top = y * stride;
  const bottom = (y + height) * stride;
  return table[bottom + x + width]! - table[bottom + x]! - table[top + x + width]! + table[top + x]!;
}
