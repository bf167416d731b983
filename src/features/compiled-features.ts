import { featureCells, type HaarFeature } from './haar-feature.js';
import { addRectangleCorners, sortedCorners } from './rectangle-corners.js';

/**
 * Features at scale 1 compiled to corner lists over an integral table of a
 * fixed stride, for the hot loop of training. A grid of c × r cells touches only
 * (c+1)(r+1) distinct table corners, and merging the four corners of each cell
 * leaves 6 reads for a two-cell feature, 8 for three cells and 9 for four,
 * instead of 4 per cell (tilted grids alike, on the rotated table); centre-surround
 * reads 8 (two blocks).
 *
 * Feature f reads corners `starts[f] .. starts[f+1]-1`:
 * value = Σ coefficients[k] · table[base + offsets[k]].
 */
export interface CompiledFeatures {
  readonly count: number;
  readonly stride: number;
  readonly starts: Int32Array;
  readonly offsets: Int32Array;
  readonly coefficients: Float64Array;
}

/**
 * Compiles features for integral tables with `stride = windowWidth + 1` (sample
 * tables, packWindowSamples); tilted kinds read the rotated table at `rotatedAt`
 * entries from the upright one (WindowSamples.rotatedAt).
 * @throws RectboostError `invalid-option` for a tilted feature without `rotatedAt`.
 */
export function compileFeatures(features: readonly HaarFeature[], stride: number, rotatedAt?: number): CompiledFeatures {
  const starts = new Int32Array(features.length + 1);
  const offsets: number[] = [];
  const coefficients: number[] = [];
  for (let f = 0; f < features.length; f++) {
    const corners = new Map<number, number>();
    for (const cell of featureCells(features[f]!)) addRectangleCorners(corners, cell, stride, rotatedAt);
    starts[f] = offsets.length;
    for (const [offset, coefficient] of sortedCorners(corners)) {
      offsets.push(offset);
      coefficients.push(coefficient);
    }
  }
  starts[features.length] = offsets.length;
  return {
    count: features.length,
    stride,
    starts,
    offsets: Int32Array.from(offsets),
    coefficients: Float64Array.from(coefficients),
  };
}

/** Raw value of compiled feature `f` on the table that starts at `base` in `tables`. */
export function evaluateCompiledFeature(compiled: CompiledFeatures, f: number, tables: Float64Array, base: number): number {
  const { starts, offsets, coefficients } = compiled;
  let value = 0;
  for (let k = starts[f]!, end = starts[f + 1]!; k < end; k++) {
    value += coefficients[k]! * tables[base + offsets[k]!]!;
  }
  return value;
}
