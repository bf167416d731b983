import { RectboostError } from '../errors.js';
import type { ImageDetections } from '../parallel/detect-files.js';

/** Version of the detections JSON Lines layout (DESIGN §3). */
export const DETECTIONS_VERSION = 1;

/** How a detections line is written. */
export interface DetectionLineOptions {
  /** Line number of the image in its image list; written as `line` right after `version`. */
  readonly line?: number;
  /** Write `milliseconds` (default true). Leave it out for output that is the same byte for byte on every run. */
  readonly timing?: boolean;
}

/**
 * One JSON line of the detections file (no newline): version, [line,] image,
 * width, height, detections [{box, score, support}], windowsScanned[, milliseconds
 * rounded to 0.01].
 */
export function formatDetectionLine(result: ImageDetections, options: DetectionLineOptions = {}): string {
  return JSON.stringify({
    version: DETECTIONS_VERSION,
    ...(options.line === undefined ? {} : { line: options.line }),
    image: result.image,
    width: result.width,
    height: result.height,
    detections: result.detections.map((d) => ({ box: d.box, score: d.score, support: d.support })),
    windowsScanned: result.windowsScanned,
    ...(options.timing === false ? {} : { milliseconds: Math.round(result.milliseconds * 100) / 100 }),
  });
}

/**
 * The list line number of a detections line written with a `line` field.
 * @throws RectboostError `bad-data` naming `where` when the text is not such a line.
 */
export function listLineOfDetectionLine(text: string, where: string): number {
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (error) {
    throw new RectboostError('bad-data', `${where} is not a JSON detections line; remove that file's broken lines or run its shard again from scratch.`, { cause: error });
  }
  const line = typeof value === 'object' && value !== null ? (value as Record<string, unknown>)['line'] : undefined;
  if (typeof line !== 'number' || !Number.isSafeInteger(line) || line < 1) {
    throw new RectboostError('bad-data', `${where} has no list line number ("line": a whole number ≥ 1); it was not written by detect --list.`);
  }
  return line;
}
