import { checkThat } from '../check.js';
import type { GrayImage } from '../image/gray-image.js';
import { computeIntegralImage } from '../image/integral-image.js';
import { windowInverseDeviation } from '../image/window-statistics.js';

/**
 * A set of training windows, all windowWidth × windowHeight, packed for fast
 * feature evaluation: sample s's integral table (stride windowWidth + 1, see
 * computeIntegralImage) starts at `s · tableSize` in `tables`, and
 * `inverseStandardDeviations[s]` is 1/σ of its pixels (0 for a flat window, so
 * its normalized responses are all 0).
 */
export interface WindowSamples {
  readonly windowWidth: number;
  readonly windowHeight: number;
  readonly count: number;
  /** (windowWidth + 1) · (windowHeight + 1) */
  readonly tableSize: number;
  readonly tables: Float64Array;
  readonly inverseStandardDeviations: Float64Array;
}

/**
 * Packs windows into WindowSamples. `tables` may be given (e.g. backed by a
 * SharedArrayBuffer) and must hold count · tableSize entries.
 * @throws RectboostError `invalid-option` when a window has the wrong size.
 */
export function packWindowSamples(
  windows: readonly GrayImage[],
  windowWidth: number,
  windowHeight: number,
  storage?: { tables: Float64Array; inverseStandardDeviations: Float64Array },
): WindowSamples {
  const tableSize = (windowWidth + 1) * (windowHeight + 1);
  const tables = storage?.tables ?? new Float64Array(windows.length * tableSize);
  const inverseStandardDeviations = storage?.inverseStandardDeviations ?? new Float64Array(windows.length);
  checkThat(tables.length >= windows.length * tableSize, 'Sample storage is too small for the windows given.');
  for (let s = 0; s < windows.length; s++) {
    const window = windows[s]!;
    checkThat(
      window.width === windowWidth && window.height === windowHeight,
      `Sample ${s} is ${window.width}×${window.height}; every sample must be ${windowWidth}×${windowHeight}.`,
    );
    const integral = computeIntegralImage(window);
    tables.set(integral.sum, s * tableSize);
    inverseStandardDeviations[s] = windowInverseDeviation(integral, 0, 0, windowWidth, windowHeight);
  }
  return { windowWidth, windowHeight, count: windows.length, tableSize, tables, inverseStandardDeviations };
}
