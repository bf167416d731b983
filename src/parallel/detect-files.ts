import pLimit from 'p-limit';
import type { DetectorCascade } from '../detect/detector-cascade.js';
import { mergeDetections, type Detection, type MergeOptions } from '../detect/merge-detections.js';
import type { ScanOptions, ScanStatistics } from '../detect/scan-image.js';
import type { GrayImage } from '../image/gray-image.js';
import { decodeGrayImageFile } from '../io/decode-image.js';
import { createScanPool, type ScanPool } from './scan-pool.js';

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
  for await (const { outcome } of detectEntries(cascade, files.map((image) => ({ image })), options)) yield outcome;
}

/**
 * detectFiles over a stream of entries that name their image (e.g. the lines of an
 * image list): yields each entry with its outcome, in input order. It reads ahead
 * only a bounded number of entries (four times the decode concurrency), so a list
 * of any length runs in constant memory.
 * @example for await (const { entry, outcome } of detectEntries(cascade, readImageList('list.txt'))) console.log(entry.line, outcome.kind);
 */
export async function* detectEntries<E extends { readonly image: string }>(
  cascade: DetectorCascade,
  entries: Iterable<E> | AsyncIterable<E>,
  options: DetectFilesOptions = {},
): AsyncGenerator<{ readonly entry: E; readonly outcome: FileOutcome }> {
  const concurrency = options.concurrency ?? 4;
  const pool = createScanPool(cascade, options.workers);
  const limit = pLimit(concurrency);
  const ahead: Array<{ entry: E; task: Promise<FileOutcome> }> = [];
  try {
    for await (const entry of entries) {
      const task = limit(() => detectOne(pool, entry.image, options));
      // Keep rejections from going unhandled while earlier files are awaited.
      task.catch(() => {});
      ahead.push({ entry, task });
      if (ahead.length >= 4 * concurrency) {
        const first = ahead.shift()!;
        yield { entry: first.entry, outcome: await first.task };
      }
    }
    for (const { entry, task } of ahead) yield { entry, outcome: await task };
  } finally {
    // At most 4 × concurrency files are still in flight when the consumer stops early.
    await Promise.allSettled(ahead.map((a) => a.task));
    await pool.close();
  }
}

async function detectOne(pool: ScanPool, file: string, options: DetectFilesOptions): Promise<FileOutcome> {
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
}
