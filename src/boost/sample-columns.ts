import { checkThat } from '../check.js';
import type { WindowSamples } from '../features/window-samples.js';

/**
 * Training samples laid out for building the response matrix feature by feature:
 * integral-table entry e of sample s is `columns[e · sampleCount + s]`, so a
 * feature's 6–9 corner reads walk 6–9 contiguous streams as s runs, instead of
 * jumping a whole table per sample.
 *
 * Float32 is exact here: entries are integer pixel sums of at most
 * 64 · 64 · 255 = 1,044,480 < 2^24 (MAX_WINDOW_SIDE = 64), and halving the size
 * against Float64 keeps twice as many streams in cache.
 * Samples are positives first, then negatives (the split search relies on it).
 */
export interface SampleColumns {
  readonly sampleCount: number;
  readonly positiveCount: number;
  readonly tableSize: number;
  readonly columns: Float32Array;
  /** 1/σ per sample, copied from the WindowSamples (0 for flat windows). */
  readonly inverseStandardDeviations: Float64Array;
}

/** Arrays a caller lends packSampleColumns to write into (e.g. a run's StageBuffers). */
export interface SampleColumnStorage {
  readonly columns: Float32Array;
  readonly inverseStandardDeviations: Float64Array;
}

/**
 * Transposes positives then negatives into SampleColumns. `target` is either a
 * function that allocates each array's buffer (e.g. SharedArrayBuffers; default:
 * ordinary ArrayBuffers) or storage to fill, whose leading entries are used and
 * returned as views.
 * @throws RectboostError `invalid-option` when the two sets have different windows
 *   or the storage is too small.
 */
export function packSampleColumns(
  positives: WindowSamples,
  negatives: WindowSamples,
  target: ((bytes: number) => ArrayBufferLike) | SampleColumnStorage = (bytes) => new ArrayBuffer(bytes),
): SampleColumns {
  checkThat(
    positives.windowWidth === negatives.windowWidth && positives.windowHeight === negatives.windowHeight,
    `Positives are ${positives.windowWidth}×${positives.windowHeight} windows and negatives ${negatives.windowWidth}×${negatives.windowHeight}; both must use the same window.`,
  );
  const sampleCount = positives.count + negatives.count;
  const tableSize = positives.tableSize;
  let columns: Float32Array;
  let inverseStandardDeviations: Float64Array;
  if (typeof target === 'function') {
    columns = new Float32Array(target(4 * tableSize * sampleCount));
    inverseStandardDeviations = new Float64Array(target(8 * sampleCount));
  } else {
    checkThat(target.columns.length >= tableSize * sampleCount && target.inverseStandardDeviations.length >= sampleCount,
      `Sample storage holds ${target.inverseStandardDeviations.length} samples of ${Math.floor(target.columns.length / tableSize)} table entries; ${sampleCount} samples of ${tableSize} are needed.`);
    columns = target.columns.subarray(0, tableSize * sampleCount);
    inverseStandardDeviations = target.inverseStandardDeviations.subarray(0, sampleCount);
  }
  let s = 0;
  for (const set of [positives, negatives]) {
    for (let i = 0; i < set.count; i++, s++) {
      const base = i * tableSize;
      for (let e = 0; e < tableSize; e++) columns[e * sampleCount + s] = set.tables[base + e]!;
      inverseStandardDeviations[s] = set.inverseStandardDeviations[i]!;
    }
  }
  return { sampleCount, positiveCount: positives.count, tableSize, columns, inverseStandardDeviations };
}
