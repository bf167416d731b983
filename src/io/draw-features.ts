import { weakClassifierSplits, type CascadeModel, type WeakClassifier } from '../cascade/cascade-model.js';
import { featureCells } from '../features/haar-feature.js';
import type { RgbImage } from './encode-image.js';

/** Tint of cells with positive weight in feature drawings (warm orange). */
export const POSITIVE_CELL_COLOUR = [255, 120, 40] as const;
/** Tint of cells with negative weight in feature drawings (cool blue). */
export const NEGATIVE_CELL_COLOUR = [40, 120, 255] as const;

/**
 * A sheet of tiles, one row per stage and one tile per weak classifier: each
 * tile is the backdrop window (the model's mean positive, or mid gray) enlarged
 * `zoom` times with the feature's cells (a tree's root split's) tinted half-way toward
 * POSITIVE_CELL_COLOUR (weight > 0) or NEGATIVE_CELL_COLOUR (weight < 0);
 * tilted cells are drawn as the pixels they sum (a 45° staircase).
 * Tiles are separated by a 2-pixel dark gutter. Pure; returns RGB pixels.
 * @param backdrop windowWidth·windowHeight gray levels 0..255, row-major.
 */
export function drawFeatureSheet(
  rows: ReadonlyArray<readonly WeakClassifier[]>,
  windowWidth: number,
  windowHeight: number,
  backdrop: ArrayLike<number>,
  zoom = 8,
): RgbImage {
  const gutter = 2;
  const tileWidth = windowWidth * zoom;
  const tileHeight = windowHeight * zoom;
  const columns = Math.max(1, ...rows.map((row) => row.length));
  const width = gutter + columns * (tileWidth + gutter);
  const height = gutter + Math.max(1, rows.length) * (tileHeight + gutter);
  const data = new Uint8Array(width * height * 3).fill(24);
  rows.forEach((row, r) => {
    row.forEach((weak, c) => {
      const left = gutter + c * (tileWidth + gutter);
      const top = gutter + r * (tileHeight + gutter);
      const tint = new Int8Array(windowWidth * windowHeight);
      // Later blocks paint over earlier ones (centre-surround: the centre over its ring).
      for (const cell of featureCells(weakClassifierSplits(weak)[0]!.feature)) {
        const mark = cell.weight > 0 ? 1 : -1;
        if (cell.tilted !== true) {
          for (let y = cell.y; y < cell.y + cell.height; y++) {
            for (let x = cell.x; x < cell.x + cell.width; x++) tint[y * windowWidth + x] = mark;
          }
          continue;
        }
        // A tilted cell's pixels, by their rotated coordinates (tiltedRectangleSum), within its footprint.
        for (let y = cell.y; y < cell.y + cell.width + cell.height; y++) {
          for (let x = cell.x - cell.height; x < cell.x + cell.width; x++) {
            const u = x + y + 1 - (cell.x + cell.y);
            const v = y - x - (cell.y - cell.x);
            if (u > 0 && u <= 2 * cell.width && v > 0 && v <= 2 * cell.height) tint[y * windowWidth + x] = mark;
          }
        }
      }
      for (let y = 0; y < tileHeight; y++) {
        for (let x = 0; x < tileWidth; x++) {
          const source = Math.floor(y / zoom) * windowWidth + Math.floor(x / zoom);
          const gray = Math.max(0, Math.min(255, Math.round(backdrop[source] ?? 128)));
          const mark = tint[source]!;
          const colour = mark > 0 ? POSITIVE_CELL_COLOUR : mark < 0 ? NEGATIVE_CELL_COLOUR : null;
          const at = 3 * ((top + y) * width + left + x);
          for (let k = 0; k < 3; k++) data[at + k] = colour ? Math.round((gray + colour[k]!) / 2) : gray;
        }
      }
    });
  });
  return { width, height, data };
}

/**
 * The feature sheet of a model: the first `featuresPerStage` weak classifiers of
 * its first `stageCount` stages over the mean positive (mid gray when the model
 * has none). Defaults: 3 stages, 5 features, zoom 8.
 */
export function drawModelFeatureSheet(
  model: Pick<CascadeModel, 'stages' | 'window' | 'meanPositive'>,
  stageCount = 3,
  featuresPerStage = 5,
  zoom = 8,
): RgbImage {
  const rows = model.stages.slice(0, stageCount).map((stage) => stage.weakClassifiers.slice(0, featuresPerStage));
  const backdrop = model.meanPositive ?? new Array<number>(model.window.width * model.window.height).fill(128);
  return drawFeatureSheet(rows, model.window.width, model.window.height, backdrop, zoom);
}
