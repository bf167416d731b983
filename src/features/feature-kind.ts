/**
 * The five basic Haar-like feature kinds of Viola & Jones (2001, §2, Figure 1).
 * Each is a grid of equal cells with per-pixel weights that sum to zero over
 * the grid, so every feature reads 0 on a flat window:
 *
 * - `two-horizontal`: 2 cells side by side along x, weights [+1, −1] (left minus right).
 * - `two-vertical`:   2 cells stacked along y, weights [+1, −1] (top minus bottom).
 * - `three-horizontal`: 3 cells along x, weights [−1, +2, −1] (centre minus both sides).
 * - `three-vertical`:   3 cells along y, weights [−1, +2, −1].
 * - `four-diagonal`: 2 × 2 cells, weights [+1, −1 / −1, +1] (one diagonal minus the other).
 *
 * The three-cell centre weight is 2, not 1, so that the feature stays zero-mean;
 * this is what makes a window `a·I + b` read exactly `a` times the values of `I`.
 */
export const BASIC_FEATURE_KINDS = [
  'two-horizontal',
  'two-vertical',
  'three-horizontal',
  'three-vertical',
  'four-diagonal',
] as const;

export type FeatureKind = (typeof BASIC_FEATURE_KINDS)[number];

/** Name of a feature set: `basic` is the five kinds above. */
export type FeatureSetName = 'basic';

/** Cell grid of one kind: columns × rows cells and their weights, row-major. */
export interface CellLayout {
  readonly columns: number;
  readonly rows: number;
  readonly weights: readonly number[];
}

export const CELL_LAYOUTS: Readonly<Record<FeatureKind, CellLayout>> = {
  'two-horizontal': { columns: 2, rows: 1, weights: [1, -1] },
  'two-vertical': { columns: 1, rows: 2, weights: [1, -1] },
  'three-horizontal': { columns: 3, rows: 1, weights: [-1, 2, -1] },
  'three-vertical': { columns: 1, rows: 3, weights: [-1, 2, -1] },
  'four-diagonal': { columns: 2, rows: 2, weights: [1, -1, -1, 1] },
};

/** True when `value` names one of the basic kinds. */
export function isFeatureKind(value: unknown): value is FeatureKind {
  return typeof value === 'string' && (BASIC_FEATURE_KINDS as readonly string[]).includes(value);
}
