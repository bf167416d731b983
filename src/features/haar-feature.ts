import { CELL_LAYOUTS, type FeatureKind } from './feature-kind.js';

/**
 * The compact descriptor of one Haar-like feature, as the model JSON carries it:
 * its kind, the anchor (x, y) of its cell grid inside the detector window, and the
 * size of one cell.
 *
 * Upright kinds: (x, y) is the grid's top-left corner; it covers
 * `columns · cellWidth` × `rows · cellHeight` pixels (see CELL_LAYOUTS).
 *
 * Tilted kinds: (x, y) is the grid's top corner; a cell is cellWidth steps along the
 * down-right diagonal (+1, +1) and cellHeight steps along the down-left one (−1, +1),
 * so with a = columns · cellWidth and b = rows · cellHeight the grid's corners are
 * top (x, y), right (x + a, y + a), bottom (x + a − b, y + a + b), left (x − b, y + b),
 * and it covers 2ab pixels (tiltedRectangleSum says which).
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

/**
 * A rectangle with a per-pixel weight. Upright (the default): half-open
 * {x, y, width, height}. Tilted (`tilted: true`): the 45° rectangle with top corner
 * (x, y), `width` steps down-right and `height` steps down-left (tiltedRectangleSum).
 */
export interface WeightedRectangle {
  readonly x: number;
  readonly y: number;
  readonly width: number;
  readonly height: number;
  readonly weight: number;
  readonly tilted?: boolean;
}

/** True when some feature is tilted: its samples and images then need the rotated table. */
export function featuresNeedRotatedTable(features: readonly HaarFeature[]): boolean {
  return features.some((feature) => CELL_LAYOUTS[feature.kind].tilted);
}

/** The box a feature covers in the window: its left and top edges and its size. */
export function featureFootprint(feature: HaarFeature): { left: number; top: number; width: number; height: number } {
  const layout = CELL_LAYOUTS[feature.kind];
  const across = layout.columns * feature.cellWidth;
  const down = layout.rows * feature.cellHeight;
  if (!layout.tilted) return { left: feature.x, top: feature.y, width: across, height: down };
  return { left: feature.x - down, top: feature.y, width: across + down, height: across + down };
}

/** Width and height of the box a feature covers (featureFootprint). */
export function featureExtent(feature: HaarFeature): { width: number; height: number } {
  const { width, height } = featureFootprint(feature);
  return { width, height };
}

/** True when the feature lies inside a window of the given size. */
export function featureFitsWindow(feature: HaarFeature, windowWidth: number, windowHeight: number): boolean {
  if (!(Number.isInteger(feature.x) && Number.isInteger(feature.y) && Number.isInteger(feature.cellWidth) && Number.isInteger(feature.cellHeight))) return false;
  if (feature.cellWidth < 1 || feature.cellHeight < 1) return false;
  const { left, top, width, height } = featureFootprint(feature);
  return left >= 0 && top >= 0 && left + width <= windowWidth && top + height <= windowHeight;
}

/**
 * The feature's blocks (CELL_LAYOUTS blocks) as weighted rectangles in window
 * coordinates: one per cell for the grids, row-major; whole grid and centre for
 * centre-surround.
 */
export function featureCells(feature: HaarFeature): WeightedRectangle[] {
  const layout = CELL_LAYOUTS[feature.kind];
  const { cellWidth, cellHeight } = feature;
  return layout.blocks.map((block) => {
    const width = block.columns * cellWidth;
    const height = block.rows * cellHeight;
    if (!layout.tilted) return { x: feature.x + block.column * cellWidth, y: feature.y + block.row * cellHeight, width, height, weight: block.weight };
    // Cell (column, row) of a tilted grid starts column steps down-right and row steps down-left of the top corner.
    const along = block.column * cellWidth;
    const across = block.row * cellHeight;
    return { x: feature.x + along - across, y: feature.y + along + across, width, height, weight: block.weight, tilted: true };
  });
}

/**
 * The rule for one rectangle at detector scale ≥ 1, in coordinates relative to the
 * scaled window's top-left corner; the scaled window is
 * scaledWindowWidth × scaledWindowHeight = round(W · scale) × round(H · scale).
 *
 * Upright: each edge is scaled and rounded (Math.round) on its own, so rectangles
 * that share an edge in the base window share it scaled, and the rectangle never
 * leaves the rounded window.
 *
 * Tilted: each corner is mapped on its own in rotated coordinates u = x + y,
 * v = y − x: u · scale and v · scale are rounded to the nearest integer of parity
 * round(p · scale) mod 2, where p = (x + y) mod 2 is the parity that a tilted
 * rectangle's four corners (and all corners of a tilted grid) share. So the result is
 * again a 45° rectangle, corners shared in the base window stay shared, scale 1
 * changes nothing and an integer scale k maps corner (x, y) to (kx, ky). Rounding can push a rectangle that touches the window's
 * edge one or two pixels out; then its sides are shortened (the longer first) until
 * it fits and it is moved back inside, the only case where neighbours can part.
 *
 * Both: the weight is rebalanced to `weight · baseArea / scaledArea`, so the feature
 * stays exactly zero-mean on a flat window and its value stays in base-window units.
 */
export function scaleRectangle(rectangle: WeightedRectangle, scale: number, scaledWindowWidth: number, scaledWindowHeight: number): WeightedRectangle {
  const { x, y, width, height, weight } = rectangle;
  if (rectangle.tilted !== true) {
    const left = Math.round(x * scale);
    const top = Math.round(y * scale);
    const right = Math.round((x + width) * scale);
    const bottom = Math.round((y + height) * scale);
    const scaledWidth = right - left;
    const scaledHeight = bottom - top;
    return { x: left, y: top, width: scaledWidth, height: scaledHeight, weight: (weight * width * height) / (scaledWidth * scaledHeight) };
  }
  // A corner's x + y parity, scaled: k times it for an integer scale k, so that scale 2 maps (x, y) to (2x, 2y).
  const parity = Math.round(((((x + y) % 2) + 2) % 2) * scale) % 2;
  const nearest = (value: number): number => parity + 2 * Math.round((value * scale - parity) / 2);
  const u0 = nearest(x + y);
  const u1 = nearest(x + y + 2 * width);
  const v0 = nearest(y - x);
  const v1 = nearest(y - x + 2 * height);
  let scaledWidth = (u1 - u0) / 2;
  let scaledHeight = (v1 - v0) / 2;
  let top = { x: (u0 - v0) / 2, y: (u0 + v0) / 2 };
  const room = Math.min(scaledWindowWidth, scaledWindowHeight);
  while (scaledWidth + scaledHeight > room) {
    if (scaledWidth >= scaledHeight) scaledWidth--;
    else scaledHeight--;
  }
  // The footprint is x − height .. x + width across and y .. y + width + height down.
  top = {
    x: Math.min(Math.max(top.x, scaledHeight), scaledWindowWidth - scaledWidth),
    y: Math.min(Math.max(top.y, 0), scaledWindowHeight - scaledWidth - scaledHeight),
  };
  return { x: top.x, y: top.y, width: scaledWidth, height: scaledHeight, weight: (weight * width * height) / (scaledWidth * scaledHeight), tilted: true };
}

/**
 * The feature's rectangles (featureCells) at a detector scale ≥ 1, each by
 * scaleRectangle, relative to the scaled window's top-left corner. The window size
 * (base pixels) matters only for tilted rectangles at its edge.
 */
export function scaledFeatureCells(feature: HaarFeature, scale: number, windowWidth = Infinity, windowHeight = Infinity): WeightedRectangle[] {
  const scaledWidth = Math.round(windowWidth * scale);
  const scaledHeight = Math.round(windowHeight * scale);
  return featureCells(feature).map((cell) => scaleRectangle(cell, scale, scaledWidth, scaledHeight));
}
