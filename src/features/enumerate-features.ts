import { checkInteger } from '../check.js';
import { BASIC_FEATURE_KINDS, CELL_LAYOUTS, type FeatureKind } from './feature-kind.js';
import type { HaarFeature } from './haar-feature.js';

/** Largest window side rectboost trains on; keeps feature counts and memory bounded. */
export const MAX_WINDOW_SIDE = 64;

/**
 * Number of features of one kind in a window, in closed form: for a grid of
 * c × r cells, Σ_{w=1..⌊W/c⌋} (W − c·w + 1) · Σ_{h=1..⌊H/r⌋} (H − r·h + 1).
 */
export function countFeaturesOfKind(kind: FeatureKind, windowWidth: number, windowHeight: number): number {
  const { columns, rows } = CELL_LAYOUTS[kind];
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
 * windowWidth × windowHeight window. Order (stable, part of the model's
 * determinism): kind in the order given, then cellHeight, cellWidth, y, x ascending.
 * 162,336 features for 24 × 24 and the five basic kinds.
 * @throws RectboostError `invalid-option` for window sides outside 1..MAX_WINDOW_SIDE.
 */
export function enumerateFeatures(windowWidth: number, windowHeight: number, kinds: readonly FeatureKind[] = BASIC_FEATURE_KINDS): HaarFeature[] {
  checkInteger('window width', windowWidth, 1, MAX_WINDOW_SIDE);
  checkInteger('window height', windowHeight, 1, MAX_WINDOW_SIDE);
  const features: HaarFeature[] = [];
  for (const kind of kinds) {
    const { columns, rows } = CELL_LAYOUTS[kind];
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
