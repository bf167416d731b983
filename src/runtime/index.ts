/**
 * rectboost/runtime: detection for browsers, edge runtimes and any other
 * JavaScript host. Plain ES modules with no Node built-ins, no sharp and no
 * worker threads (test/runtime/import-graph.test.ts checks the import graph):
 * load a runtime cascade (rectboost export), then detect on a gray buffer or a
 * canvas ImageData with the scan and merge options of `rectboost detect`.
 *
 * The scan runs in rectboost's WebAssembly SIMD kernel when the host can
 * compile it, else in a plain-JS twin that gives the same bits (scanImagePlain).
 *
 * @example
 *   import { loadDetector, detect } from 'rectboost/runtime';
 *   const detector = loadDetector(await (await fetch('cascade.json')).text());
 *   const { detections } = detect(detector, context.getImageData(0, 0, width, height));
 */
import { RectboostError } from '../errors.js';
import { runtimeCascadeFromValue } from '../cascade/runtime-export.js';
import { cascadeUsesTiltedFeatures, type DetectorCascade } from '../detect/detector-cascade.js';
import { mergeDetections, type Detection, type MergeOptions } from '../detect/merge-detections.js';
import { scanImage, type ScanOptions, type ScanStatistics } from '../detect/scan-image.js';
import { SCAN_KERNEL_BASE64 } from '../detect/scan-kernel-binary.js';
import type { GrayImage } from '../image/gray-image.js';
import { computeIntegralImage } from '../image/integral-image.js';
import { scanImagePlain } from './plain-scan.js';

export { RectboostError, isRectboostError, type RectboostErrorCode } from '../errors.js';
export type { DetectorCascade } from '../detect/detector-cascade.js';
export type { Detection, MergeMethod, MergeOptions } from '../detect/merge-detections.js';
export type { ScanOptions, ScanStatistics } from '../detect/scan-image.js';
export type { GrayImage } from '../image/gray-image.js';
export type { Box } from '../metrics/intersection-over-union.js';
export { detectionScore, scanImagePlain } from './plain-scan.js';

/** The part of a canvas ImageData that detect reads (RGBA, 4 bytes per pixel). */
export interface RgbaPixels {
  readonly width: number;
  readonly height: number;
  readonly data: Uint8ClampedArray | Uint8Array;
}

/** Which scan ran: the WebAssembly kernel or the plain-JS twin. */
export type ScanEngine = 'kernel' | 'plain';

/** Options of detect: the scan, the merge (as `rectboost detect`), and the engine. */
export interface RuntimeDetectOptions {
  readonly scan?: ScanOptions;
  readonly merge?: MergeOptions;
  /** 'auto' (default): the kernel when scanKernelAvailable(), else plain. */
  readonly engine?: ScanEngine | 'auto';
}

/** What detect found in one image. */
export interface RuntimeDetections {
  readonly width: number;
  readonly height: number;
  readonly detections: Detection[];
  readonly windowsScanned: number;
  readonly statistics: ScanStatistics;
  readonly engine: ScanEngine;
}

let kernelUsable: boolean | undefined;

/** True when this host can compile the scan kernel (WebAssembly with 128-bit SIMD). */
export function scanKernelAvailable(): boolean {
  if (kernelUsable === undefined) {
    const host = globalThis as unknown as { WebAssembly?: { validate(bytes: Uint8Array): boolean } };
    kernelUsable = host.WebAssembly !== undefined && host.WebAssembly.validate(Uint8Array.from(atob(SCAN_KERNEL_BASE64), (c) => c.charCodeAt(0)));
  }
  return kernelUsable;
}

/**
 * Reads a runtime cascade (the JSON text of `rectboost export`, or that JSON
 * already parsed) and validates every field before use.
 * @throws RectboostError `bad-model` naming the field.
 */
export function loadDetector(cascade: string | object, label = 'the runtime cascade'): DetectorCascade {
  let value: unknown = cascade;
  if (typeof cascade === 'string') {
    try {
      value = JSON.parse(cascade);
    } catch (error) {
      throw new RectboostError('bad-model', `Cascade ${label} is not valid JSON (${(error as Error).message}); pass the file written by rectboost export.`, { cause: error });
    }
  }
  return runtimeCascadeFromValue(value, label);
}

/**
 * Gray levels of RGBA pixels: round(0.299 R + 0.587 G + 0.114 B) (ITU-R BT.601
 * luma weights, in integers; alpha ignored). A gray picture (R = G = B) keeps
 * its values exactly; for colour pictures the CLI's sharp conversion may differ
 * by a level or so.
 */
export function grayFromRgba(pixels: RgbaPixels): GrayImage {
  const { width, height, data } = pixels;
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1 || data.length !== 4 * width * height) {
    throw new RectboostError('invalid-option', `RGBA pixels must hold 4 · width · height bytes for positive integer sides; received ${width}×${height} with ${data.length} bytes.`);
  }
  const gray = new Uint8Array(width * height);
  for (let i = 0, j = 0; i < gray.length; i++, j += 4) gray[i] = Math.floor((299 * data[j]! + 587 * data[j + 1]! + 114 * data[j + 2]! + 500) / 1000);
  return { width, height, data: gray };
}

/**
 * Detects objects in a gray image (GrayImage: one byte per pixel, row-major) or
 * RGBA pixels (a canvas ImageData): integral image, multiscale scan, merge —
 * the same detections as `rectboost detect` on the same pixels and options.
 * @throws RectboostError `invalid-option` for bad options or pixels.
 */
export function detect(cascade: DetectorCascade, image: GrayImage | RgbaPixels, options: RuntimeDetectOptions = {}): RuntimeDetections {
  // One byte per pixel is gray; anything else must be RGBA.
  const gray: GrayImage = image.data.length === image.width * image.height ? { width: image.width, height: image.height, data: image.data as Uint8Array } : grayFromRgba(image);
  const requested = options.engine ?? 'auto';
  const engine: ScanEngine = requested === 'auto' ? (scanKernelAvailable() ? 'kernel' : 'plain') : requested;
  const integral = computeIntegralImage(gray, { rotated: cascadeUsesTiltedFeatures(cascade) });
  const scanned = engine === 'kernel' ? scanImage(cascade, integral, options.scan ?? {}) : scanImagePlain(cascade, integral, options.scan ?? {});
  return {
    width: gray.width,
    height: gray.height,
    detections: mergeDetections(scanned.hits, options.merge ?? {}),
    windowsScanned: scanned.statistics.windowsScanned,
    statistics: scanned.statistics,
    engine,
  };
}
