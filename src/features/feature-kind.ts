/**
 * The Haar-like feature kinds. Each is a grid of equal cells with per-pixel weights
 * that sum to zero over the grid, so every feature reads 0 on a flat window.
 *
 * The five basic kinds of Viola & Jones (2001, §2, Figure 1), upright:
 *
 * - `two-horizontal`: 2 cells side by side along x, weights [+1, −1] (left minus right).
 * - `two-vertical`:   2 cells stacked along y, weights [+1, −1] (top minus bottom).
 * - `three-horizontal`: 3 cells along x, weights [−1, +2, −1] (centre minus both sides).
 * - `three-vertical`:   3 cells along y, weights [−1, +2, −1].
 * - `four-diagonal`: 2 × 2 cells, weights [+1, −1 / −1, +1] (one diagonal minus the other).
 *
 * The extended set adds, after Lienhart & Maydt (2002; the kinds recalled from memory,
 * the choice of this set is ours):
 *
 * - `tilted-two-horizontal`, `tilted-two-vertical`, `tilted-three-horizontal`,
 *   `tilted-three-vertical`: the two- and three-cell grids turned by 45° — the grid's
 *   x axis runs down-right, its y axis down-left (see HaarFeature for the corners),
 *   summed on the rotated table (computeRotatedSum).
 * - `centre-surround`: 3 × 3 cells, the centre cell +8 and the eight around it −1
 *   (a spot brighter than its ring); written as two overlapping blocks, the whole
 *   grid at −1 and the centre at +9, so it costs 8 table reads instead of 16.
 * - `tilted-centre-surround`: the same on the 45° grid.
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

/** The kinds the extended set adds to the basic ones (see above). */
export const EXTENDED_ONLY_FEATURE_KINDS = [
  'tilted-two-horizontal',
  'tilted-two-vertical',
  'tilted-three-horizontal',
  'tilted-three-vertical',
  'centre-surround',
  'tilted-centre-surround',
] as const;

/** The extended set: the basic kinds, then the tilted and centre-surround ones. */
export const EXTENDED_FEATURE_KINDS = [...BASIC_FEATURE_KINDS, ...EXTENDED_ONLY_FEATURE_KINDS] as const;

export type FeatureKind = (typeof EXTENDED_FEATURE_KINDS)[number];

/** One of the five basic kinds. */
export type BasicFeatureKind = (typeof BASIC_FEATURE_KINDS)[number];

/** Name of a feature set: `basic` is the five upright kinds, `extended` all eleven. */
export type FeatureSetName = 'basic' | 'extended';

export const FEATURE_SET_NAMES: readonly FeatureSetName[] = ['basic', 'extended'];

/** The kinds of each feature set, in enumeration order. */
export const FEATURE_SET_KINDS: Readonly<Record<FeatureSetName, readonly FeatureKind[]>> = {
  basic: BASIC_FEATURE_KINDS,
  extended: EXTENDED_FEATURE_KINDS,
};

/**
 * A weighted block of a cell grid, in cells: `columns` × `rows` cells from cell
 * (column, row), with a per-pixel weight. Blocks may overlap; a pixel's weight is
 * the sum over the blocks that hold it.
 */
export interface CellBlock {
  readonly column: number;
  readonly row: number;
  readonly columns: number;
  readonly rows: number;
  readonly weight: number;
}

/**
 * Cell grid of one kind: columns × rows cells, their per-pixel weights (row-major,
 * for drawings and brute-force references), the blocks the feature is summed as
 * (one per cell for the grids, two for centre-surround), and whether the grid is
 * turned by 45°.
 */
export interface CellLayout {
  readonly columns: number;
  readonly rows: number;
  readonly weights: readonly number[];
  readonly blocks: readonly CellBlock[];
  readonly tilted: boolean;
}

function gridLayout(columns: number, rows: number, weights: readonly number[], tilted: boolean): CellLayout {
  const blocks: CellBlock[] = [];
  for (let row = 0; row < rows; row++) {
    for (let column = 0; column < columns; column++) blocks.push({ column, row, columns: 1, rows: 1, weight: weights[row * columns + column]! });
  }
  return { columns, rows, weights, blocks, tilted };
}

function centreSurroundLayout(tilted: boolean): CellLayout {
  return {
    columns: 3,
    rows: 3,
    weights: [-1, -1, -1, -1, 8, -1, -1, -1, -1],
    blocks: [{ column: 0, row: 0, columns: 3, rows: 3, weight: -1 }, { column: 1, row: 1, columns: 1, rows: 1, weight: 9 }],
    tilted,
  };
}

export const CELL_LAYOUTS: Readonly<Record<FeatureKind, CellLayout>> = {
  'two-horizontal': gridLayout(2, 1, [1, -1], false),
  'two-vertical': gridLayout(1, 2, [1, -1], false),
  'three-horizontal': gridLayout(3, 1, [-1, 2, -1], false),
  'three-vertical': gridLayout(1, 3, [-1, 2, -1], false),
  'four-diagonal': gridLayout(2, 2, [1, -1, -1, 1], false),
  'tilted-two-horizontal': gridLayout(2, 1, [1, -1], true),
  'tilted-two-vertical': gridLayout(1, 2, [1, -1], true),
  'tilted-three-horizontal': gridLayout(3, 1, [-1, 2, -1], true),
  'tilted-three-vertical': gridLayout(1, 3, [-1, 2, -1], true),
  'centre-surround': centreSurroundLayout(false),
  'tilted-centre-surround': centreSurroundLayout(true),
};

/** True when `value` names a kind of the given feature set (default: any kind). */
export function isFeatureKind(value: unknown, featureSet: FeatureSetName = 'extended'): value is FeatureKind {
  return typeof value === 'string' && (FEATURE_SET_KINDS[featureSet] as readonly string[]).includes(value);
}

/** True when a kind is summed on the rotated table. */
export function isTiltedKind(kind: FeatureKind): boolean {
  return CELL_LAYOUTS[kind].tilted;
}
