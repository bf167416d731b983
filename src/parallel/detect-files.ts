import pLimit from 'p-limit';
import type { DetectorCascade } from '../detect/detector-cascade.js';
import { mergeDetections, type Detection, type MergeOptions } from '../detect/merge-detections.js';
import type { ScanOptions, ScanStatistics } from '../detect/scan-image.js';
import type { GrayImage } from '../image/gray-image.js';
import { decodeGrayImageFile } from '../io/decode-image.js';
import { createScanPool } from './scan-pool.js';

/** Detections of one image file: the line format of DESIGN §3 plus work counters. */
export interface ImageDetections {
  readonly image: string;
  readonly width: number;
  readonly height: number;
  readonly detections: readonly Detection[];
  readonly windowsScanned: number;
  /** Integral image + scan + merge, on a worker (decoding excluded). */
  readonly milliseconds: number;
  readonly statistics: ScanStatistics;
}

/** One outcome per input file, in input order: detections, or the error that stopped that file. */
export type FileOutcome =
  | { readonly kind: 'detected'; readonly result: ImageDetections; readonly pixels: GrayImage }
  | { readonly kind: 'failed'; readonly image: string; readonly error: unknown };

/** Options of detectFiles. */
export interface DetectFilesOptions {
  readonly scan?: ScanOptions;
  readonly merge?: MergeOptions;
  /** Images decoded at once (p-limit); default 4. */
  readonly concurrency?: number;
  /** Scan threads; default: available parallelism; 0 scans on the calling thread. */
  readonly workers?: number;
  /** Pixel limit per image; default DEFAULT_MAX_PIXELS. */
  readonly maxPixels?: number;
}

/**
 * Decodes files concurrently (p-limit), scans them on worker threads and
 * merges the hits; yields one outcome per file in input order as soon as it
 * and every file before it are done. A file that cannot be decoded yields a
 * `failed` outcome and the others go on.
 * @example for await (const outcome of detectFiles(cascade, files)) console.log(outcome.kind);
 */
export async function* detectFiles(cascade: DetectorCascade, files: readonly string[], options: DetectFilesOptions = {}): AsyncGenerator<FileOutcome> {
  const pool = createScanPool(cascade, options.workers);
  const limit = pLimit(options.concurrency ?? 4);
  try {
    const tasks = files.map((file) =>
      limit(async (): Promise<FileOutcome> => {
        try {
          const image = await decodeGrayImageFile(file, options.maxPixels === undefined ? {} : { maxPixels: options.maxPixels });
          const scanned = await pool.scan(image, options.scan ?? {});
          const start = performance.now();
          const detections = mergeDetections(scanned.hits, options.merge ?? {});
          return {
            kind: 'detected',
            pixels: image,
            result: {
              image: file,
              width: image.width,
              height: image.height,
              detections,
              windowsScanned: scanned.statistics.windowsScanned,
              milliseconds: scanned.milliseconds + performance.now() - start,
              statistics: scanned.statistics,
            },
          };
        } catch (error) {
          return { kind: 'failed', image: file, error };
        }
      }),
    );
    // Keep rejections from going unhandled while earlier files are awaited.
    for (const task of tasks) task.catch(() => {});
    for (const task of tasks) yield await task;
  } finally {
    await pool.close();
  }
}
