import { checkThat } from '../check.js';
import type { GrayImage } from '../image/gray-image.js';
import { computeIntegralImage, type IntegralImageOptions } from '../image/integral-image.js';
import { windowInverseDeviation } from '../image/window-statistics.js';

/**
 * A set of training windows, all windowWidth × windowHeight, packed for fast
 * feature evaluation: sample s's integral table (stride windowWidth + 1, see
 * computeIntegralImage) starts at `s · tableSize` in `tables` — the upright table,
 * then, when `rotatedAt` is set, the rotated one `rotatedAt` entries after it — and
 * `inverseStandardDeviations[s]` is 1/σ of its pixels (0 for a flat window, so
 * its normalized responses are all 0).
 */
export interface WindowSamples {
  readonly windowWidth: number;
  readonly windowHeight: number;
  readonly count: number;
  /** (windowWidth + 1) · (windowHeight + 1), twice that with the rotated table */
  readonly tableSize: number;
  /** (windowWidth + 1) · (windowHeight + 1) when the rotated tables are packed (tilted features), else absent */
  readonly rotatedAt?: number;
  readonly tables: Float64Array;
  readonly inverseStandardDeviations: Float64Array;
}

/**
 * Packs windows into WindowSamples, with the rotated tables when `tables.rotated`
 * (needed by tilted features; basic ones leave it off and keep half the memory).
 * `storage` may be given (e.g. backed by a SharedArrayBuffer) and must hold
 * count · tableSize entries.
 * @throws RectboostError `invalid-option` when a window has the wrong size.
 * @example packWindowSamples(windows, 24, 24, undefined, { rotated: true })
 */
export function packWindowSamples(
  windows: readonly GrayImage[],
  windowWidth: number,
  windowHeight: number,
  storage?: { tables: Float64Array; inverseStandardDeviations: Float64Array },
  tableOptions: IntegralImageOptions = {},
): WindowSamples {
  const uprightSize = (windowWidth + 1) * (windowHeight + 1);
  const rotated = tableOptions.rotated === true;
  const tableSize = rotated ? 2 * uprightSize : uprightSize;
  const tables = storage?.tables ?? new Float64Array(windows.length * tableSize);
  const inverseStandardDeviations = storage?.inverseStandardDeviations ?? new Float64Array(windows.length);
  checkThat(tables.length >= windows.length * tableSize, 'Sample storage is too small for the windows given.');
  for (let s = 0; s < windows.length; s++) {
    const window = windows[s]!;
    checkThat(
      window.width === windowWidth && window.height === windowHeight,
      `Sample ${s} is ${window.width}×${window.height}; every sample must be ${windowWidth}×${windowHeight}.`,
    );
    const integral = computeIntegralImage(window, tableOptions);
    tables.set(integral.sum, s * tableSize);
    inverseStandardDeviations[s] = windowInverseDeviation(integral, 0, 0, windowWidth, windowHeight);
  }
  const packed = { windowWidth, windowHeight, count: windows.length, tableSize, tables, inverseStandardDeviations };
  return rotated ? { ...packed, rotatedAt: uprightSize } : packed;
}
