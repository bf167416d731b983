import { CELL_LAYOUTS, type FeatureKind } from './feature-kind.js';

/**
 * The compact descriptor of one Haar-like feature, as the model JSON carries it:
 * its kind, the top-left corner (x, y) of its cell grid inside the detector
 * window, and the size of one cell. The feature covers
 * `columns · cellWidth` × `rows · cellHeight` pixels (see CELL_LAYOUTS).
 *
 * @example { kind: 'two-horizontal', x: 3, y: 5, cellWidth: 4, cellHeight: 6 }
 *   is two 4×6 cells at x = 3..6 and 7..10, rows 5..10: left sum minus right sum.
 */
export interface HaarFeature {
  readonly kind: FeatureKind;
  readonly x: number;
  readonly y: number;
  readonly cellWidth: number;
  readonly cellHeight: number;
}

/** A half-open rectangle with a per-pixel weight. */
export interface WeightedRectangle {
  readonly x: number;
  readonly y: number;
  readonly width: number;
  readonly height: number;
  readonly weight: number;
}

/** Full width and height covered by a feature. */
export function featureExtent(feature: HaarFeature): { width: number; height: number } {
  const layout = CELL_LAYOUTS[feature.kind];
  return { width: layout.columns * feature.cellWidth, height: layout.rows * feature.cellHeight };
}

/** True when the feature lies inside a window of the given size. */
export function featureFitsWindow(feature: HaarFeature, windowWidth: number, windowHeight: number): boolean {
  const { width, height } = featureExtent(feature);
  return (
    Number.isInteger(feature.x) && Number.isInteger(feature.y) &&
    Number.isInteger(feature.cellWidth) && Number.isInteger(feature.cellHeight) &&
    feature.x >= 0 && feature.y >= 0 && feature.cellWidth >= 1 && feature.cellHeight >= 1 &&
    feature.x + width <= windowWidth && feature.y + height <= windowHeight
  );
}

/** The feature's cells as weighted rectangles in window coordinates, row-major. */
export function featureCells(feature: HaarFeature): WeightedRectangle[] {
  const layout = CELL_LAYOUTS[feature.kind];
  const cells: WeightedRectangle[] = [];
  for (let row = 0; row < layout.rows; row++) {
    for (let column = 0; column < layout.columns; column++) {
      cells.push({
        x: feature.x + column * feature.cellWidth,
        y: feature.y + row * feature.cellHeight,
        width: feature.cellWidth,
        height: feature.cellHeight,
        weight: layout.weights[row * layout.columns + column]!,
      });
    }
  }
  return cells;
}

/**
 * The feature's cells at a detector scale ≥ 1, in coordinates relative to the
 * scaled window's top-left corner.
 *
 * Cell edges are scaled and rounded (Math.round), each edge once, so neighbouring
 * cells stay contiguous and the grid never leaves the rounded window
 * round(windowWidth · scale). Because rounding makes cell areas unequal, each
 * weight is rebalanced to `weight · baseArea / scaledArea`: the feature stays
 * exactly zero-mean on a flat window, and its value stays in base-window units
 * (a feature on a 2× nearest-neighbour upscaled image at scale 2 reads the same
 * as on the original at scale 1).
 */
export function scaledFeatureCells(feature: HaarFeature, scale: number): WeightedRectangle[] {
  const layout = CELL_LAYOUTS[feature.kind];
  const baseArea = feature.cellWidth * feature.cellHeight;
  const columnEdges: number[] = [];
  for (let column = 0; column <= layout.columns; column++) {
    columnEdges.push(Math.round((feature.x + column * feature.cellWidth) * scale));
  }
  const rowEdges: number[] = [];
  for (let row = 0; row <= layout.rows; row++) {
    rowEdges.push(Math.round((feature.y + row * feature.cellHeight) * scale));
  }
  const cells: WeightedRectangle[] = [];
  for (let row = 0; row < layout.rows; row++) {
    for (let column = 0; column < layout.columns; column++) {
      const x = columnEdges[column]!;
      const y = rowEdges[row]!;
      const width = columnEdges[column + 1]! - x;
      const height = rowEdges[row + 1]! - y;
      const weight = layout.weights[row * layout.columns + column]!;
      cells.push({ x, y, width, height, weight: (weight * baseArea) / (width * height) });
    }
  }
  return cells;
}
