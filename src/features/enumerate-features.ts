import { checkInteger } from '../check.js';
import { BASIC_FEATURE_KINDS, CELL_LAYOUTS, type FeatureKind } from './feature-kind.js';
import type { HaarFeature } from './haar-feature.js';

/** Largest window side rectboost trains on; keeps feature counts and memory bounded. */
export const MAX_WINDOW_SIDE = 64;

/**
 * Number of features of one kind in a window, in closed form. For an upright grid of
 * c × r cells: Σ_{w=1..⌊W/c⌋} (W − c·w + 1) · Σ_{h=1..⌊H/r⌋} (H − r·h + 1).
 * For a tilted grid, whose footprint is a + b square with a = c·w and b = r·h
 * (HaarFeature): Σ_{w, h ≥ 1, a + b ≤ min(W, H)} (W − a − b + 1) · (H − a − b + 1),
 * summed over s = a + b as Σ_s n(s) · (W − s + 1)(H − s + 1), where n(s) counts the
 * cell sizes with c·w + r·h = s.
 */
export function countFeaturesOfKind(kind: FeatureKind, windowWidth: number, windowHeight: number): number {
  const { columns, rows, tilted } = CELL_LAYOUTS[kind];
  if (tilted) {
    let total = 0;
    for (let span = columns + rows; span <= Math.min(windowWidth, windowHeight); span++) {
      let sizes = 0;
      for (let w = 1; columns * w + rows <= span; w++) if ((span - columns * w) % rows === 0) sizes++;
      total += sizes * (windowWidth - span + 1) * (windowHeight - span + 1);
    }
    return total;
  }
  let alongX = 0;
  for (let w = 1; w * columns <= windowWidth; w++) alongX += windowWidth - columns * w + 1;
  let alongY = 0;
  for (let h = 1; h * rows <= windowHeight; h++) alongY += windowHeight - rows * h + 1;
  return alongX * alongY;
}

/** Number of features of the given kinds in a window (default: the five basic kinds). */
export function countFeatures(windowWidth: number, windowHeight: number, kinds: readonly FeatureKind[] = BASIC_FEATURE_KINDS): number {
  let total = 0;
  for (const kind of kinds) total += countFeaturesOfKind(kind, windowWidth, windowHeight);
  return total;
}

/**
 * Every feature of the given kinds at every position and cell size inside a
 * windowWidth × windowHeight window (featureFitsWindow). Order (stable, part of the
 * model's determinism): kind in the order given, then cellHeight, cellWidth, y, x
 * ascending. 162,336 features for 24 × 24 and the five basic kinds; see
 * countFeaturesOfKind for every kind (FEATURE_SET_KINDS lists the sets).
 * @throws RectboostError `invalid-option` for window sides outside 1..MAX_WINDOW_SIDE.
 */
export function enumerateFeatures(windowWidth: number, windowHeight: number, kinds: readonly FeatureKind[] = BASIC_FEATURE_KINDS): HaarFeature[] {
  checkInteger('window width', windowWidth, 1, MAX_WINDOW_SIDE);
  checkInteger('window height', windowHeight, 1, MAX_WINDOW_SIDE);
  const features: HaarFeature[] = [];
  for (const kind of kinds) {
    const { columns, rows, tilted } = CELL_LAYOUTS[kind];
    if (tilted) {
      const side = Math.min(windowWidth, windowHeight);
      for (let cellHeight = 1; cellHeight * rows + columns <= side; cellHeight++) {
        for (let cellWidth = 1; cellWidth * columns + cellHeight * rows <= side; cellWidth++) {
          const across = cellWidth * columns;
          const down = cellHeight * rows;
          for (let y = 0; y + across + down <= windowHeight; y++) {
            for (let x = down; x + across <= windowWidth; x++) features.push({ kind, x, y, cellWidth, cellHeight });
          }
        }
      }
      continue;
    }
    for (let cellHeight = 1; cellHeight * rows <= windowHeight; cellHeight++) {
      for (let cellWidth = 1; cellWidth * columns <= windowWidth; cellWidth++) {
        for (let y = 0; y + cellHeight * rows <= windowHeight; y++) {
          for (let x = 0; x + cellWidth * columns <= windowWidth; x++) {
            features.push({ kind, x, y, cellWidth, cellHeight });
          }
        }
      }
    }
  }
  return features;
}
