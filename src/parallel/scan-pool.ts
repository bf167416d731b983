import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { checkInteger } from '../check.js';
import { cascadeUsesTiltedFeatures, type DetectorCascade } from '../detect/detector-cascade.js';
import { scanImage, resolveScanOptions, type ScanOptions, type ScanResult } from '../detect/scan-image.js';
import { RectboostError, type RectboostErrorCode } from '../errors.js';
import type { GrayImage } from '../image/gray-image.js';
import { computeIntegralImage } from '../image/integral-image.js';

/** A scan result with the time the scan took (integral image included), in milliseconds. */
export interface TimedScanResult extends ScanResult {
  readonly milliseconds: number;
}

/** Scans images on worker threads, one image per worker at a time. */
export interface ScanPool {
  /** Scans one image; resolves when a worker has finished it. */
  scan(image: GrayImage, options?: ScanOptions): Promise<TimedScanResult>;
  /** Stops the workers; pending scans are rejected. */
  close(): Promise<void>;
}

/**
 * Starts `workers` threads (default: available parallelism) that each hold the
 * cascade. With workers = 0 scans run on the calling thread (no threads started).
 * Image pixels are copied to the worker; hits come back as transferred buffers.
 * @throws RectboostError `invalid-option` when workers is not an integer in 0..256.
 * @example const pool = createScanPool(cascade); const result = await pool.scan(image); await pool.close();
 */
export function createScanPool(cascade: DetectorCascade, workers = availableParallelism()): ScanPool {
  checkInteger('workers', workers, 0, 256);
  if (workers === 0) {
    return {
      scan: async (image, options = {}) => {
        const start = performance.now();
        const result = scanImage(cascade, computeIntegralImage(image, { rotated: cascadeUsesTiltedFeatures(cascade) }), options);
        return { ...result, milliseconds: performance.now() - start };
      },
      close: async () => {},
    };
  }
  const url = workerScriptUrl();
  type Pending = { resolve: (result: TimedScanResult) => void; reject: (error: unknown) => void };
  const pending = new Map<number, Pending>();
  const idle: Worker[] = [];
  const queue: Array<() => void> = [];
  const threads: Worker[] = [];
  let nextId = 0;
  let closed = false;
  for (let w = 0; w < workers; w++) {
    const worker = new Worker(url, { workerData: { cascade } });
    worker.on('message', (message: { id: number; error?: { message: string; code?: string } } & TimedScanResult) => {
      const entry = pending.get(message.id);
      pending.delete(message.id);
      idle.push(worker);
      queue.shift()?.();
      if (!entry) return;
      if (message.error) entry.reject(new RectboostError((message.error.code as RectboostErrorCode | undefined) ?? 'invalid-option', message.error.message));
      else entry.resolve({ hits: message.hits, statistics: message.statistics, milliseconds: message.milliseconds });
    });
    worker.on('error', (error) => {
      for (const entry of pending.values()) entry.reject(error);
      pending.clear();
    });
    threads.push(worker);
    idle.push(worker);
  }
  return {
    scan(image, options = {}) {
      const resolved = resolveScanOptions(options); // check on the calling side, once
      return new Promise<TimedScanResult>((resolve, reject) => {
        if (closed) {
          reject(new RectboostError('interrupted', 'The scan pool is closed; create a new one.'));
          return;
        }
        const start = (): void => {
          const worker = idle.pop()!;
          const id = nextId++;
          pending.set(id, { resolve, reject });
          worker.postMessage({ id, width: image.width, height: image.height, pixels: image.data, options: resolved });
        };
        if (idle.length > 0) start();
        else queue.push(start);
      });
    },
    async close() {
      closed = true;
      for (const entry of pending.values()) entry.reject(new RectboostError('interrupted', 'The scan pool was closed before this scan finished.'));
      pending.clear();
      await Promise.all(threads.map((thread) => thread.terminate()));
    },
  };
}

/** The built worker script; under vitest (running src/*.ts) the dist/ twin is used. */
function workerScriptUrl(): URL {
  const here = new URL('./scan-worker.js', import.meta.url);
  const path = fileURLToPath(here);
  if (import.meta.url.endsWith('.ts') || !existsSync(path)) {
    return pathToFileURL(path.replace(/([\\/])src([\\/])parallel([\\/])/, '$1dist$2parallel$3'));
  }
  return here;
}
