import { CELL_LAYOUTS } from './feature-kind.js';
import type { HaarFeature } from './haar-feature.js';

/**
 * Features at scale 1 compiled to corner lists over an integral table of a
 * fixed stride, for the hot loop of training. A grid of c × r cells touches only
 * (c+1)(r+1) distinct table corners, and merging the four corners of each cell
 * leaves 6 reads for a two-cell feature, 8 for three cells and 9 for four,
 * instead of 4 per cell.
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

/** Compiles features for integral tables with `stride = windowWidth + 1`. */
export function compileFeatures(features: readonly HaarFeature[], stride: number): CompiledFeatures {
  const starts = new Int32Array(features.length + 1);
  const offsets: number[] = [];
  const coefficients: number[] = [];
  for (let f = 0; f < features.length; f++) {
    const feature = features[f]!;
    const { columns, rows, weights } = CELL_LAYOUTS[feature.kind];
    const corner = new Float64Array((columns + 1) * (rows + 1));
    for (let row = 0; row < rows; row++) {
      for (let column = 0; column < columns; column++) {
        const weight = weights[row * columns + column]!;
        // Four-corner rectangle sum (Crow 1984): +S(x1,y1) − S(x0,y1) − S(x1,y0) + S(x0,y0).
        corner[(row + 1) * (columns + 1) + column + 1]! += weight;
        corner[(row + 1) * (columns + 1) + column]! -= weight;
        corner[row * (columns + 1) + column + 1]! -= weight;
        corner[row * (columns + 1) + column]! += weight;
      }
    }
    starts[f] = offsets.length;
    for (let row = 0; row <= rows; row++) {
      for (let column = 0; column <= columns; column++) {
        const coefficient = corner[row * (columns + 1) + column]!;
        if (coefficient === 0) continue;
        const x = feature.x + column * feature.cellWidth;
        const y = feature.y + row * feature.cellHeight;
        offsets.push(y * stride + x);
        coefficients.push(coefficient);
      }
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
