import { readdir } from 'node:fs/promises';
import { basename, extname, join } from 'node:path';
import { RectboostError } from '../errors.js';
import { cropBoxToWindow, type GrayImage } from '../image/gray-image.js';
import type { Box } from '../metrics/intersection-over-union.js';
import type { DetectionErrors } from '../metrics/match-detections.js';
import { writeFileAtomic } from './atomic-write.js';
import { decodeGrayImageFile } from './decode-image.js';
import { encodeGrayPng } from './encode-image.js';

/**
 * PNG bytes of the box [x, y, width, height] of a decoded image, framed as cropBoxToWindow
 * frames it (edges rounded, clipped to the image) and resized to windowWidth × windowHeight;
 * undefined when the box lies outside the image. The one crop-to-thumbnail step for
 * evaluation errors and reports.
 * @example await boxCropPng(scene, [40.2, 18.7, 30, 30], 24, 24)
 */
export async function boxCropPng(image: GrayImage, box: Box, windowWidth: number, windowHeight: number): Promise<Buffer | undefined> {
  const window = cropBoxToWindow(image, box, windowWidth, windowHeight);
  return window === undefined ? undefined : encodeGrayPng(window);
}

/** Names of the two subfolders that writeErrorCrops fills. */
export const ERROR_CROP_FOLDERS = { falseAlarms: 'false-alarms', misses: 'missed' } as const;

/** What writeErrorCrops wrote. */
export interface WrittenErrorCrops {
  readonly falseAlarms: number;
  readonly misses: number;
  /** DIR/false-alarms: pass it to `train --negative-patches` to train them away. */
  readonly falseAlarmFolder: string;
  readonly missFolder: string;
}

/**
 * Writes every false alarm and missed object of an evaluation as a window-sized PNG crop:
 * DIR/false-alarms/ (ranked by score, highest first: `0001-p03-x112-y40-w24.png`) and
 * DIR/missed/ (`p03-x112-y40-w24.png`, image order), plus DIR/errors.jsonl listing each crop
 * with its image, box and score. Both subfolders must be empty or missing, so crops of two
 * evaluations never mix.
 * @param imagePaths the evaluated images, indexed like the errors' `image`.
 * @throws RectboostError `invalid-option` when a subfolder already holds files; `bad-image` when an image cannot be decoded.
 */
export async function writeErrorCrops(
  folder: string,
  imagePaths: readonly string[],
  errors: DetectionErrors,
  windowWidth: number,
  windowHeight: number,
): Promise<WrittenErrorCrops> {
  const falseAlarmFolder = join(folder, ERROR_CROP_FOLDERS.falseAlarms);
  const missFolder = join(folder, ERROR_CROP_FOLDERS.misses);
  for (const sub of [falseAlarmFolder, missFolder]) {
    const entries = await readdir(sub).catch(() => [] as string[]);
    if (entries.length > 0) {
      throw new RectboostError('invalid-option', `Folder ${sub} already holds ${entries.length} files; give --errors an empty or new folder so that crops of two evaluations do not mix.`);
    }
  }
  const digits = Math.max(4, String(errors.falseAlarms.length).length);
  const jobs = [
    ...errors.falseAlarms.map((error, rank) => ({ error, kind: 'false-alarm' as const, folder: falseAlarmFolder, prefix: `${String(rank + 1).padStart(digits, '0')}-` })),
    ...errors.misses.map((error) => ({ error, kind: 'missed' as const, folder: missFolder, prefix: '' })),
  ];
  // One image decoded at a time, in image order, each once.
  const byImage = new Map<number, typeof jobs>();
  for (const job of jobs) byImage.set(job.error.image, [...(byImage.get(job.error.image) ?? []), job]);
  const lines: string[] = [];
  let falseAlarms = 0;
  let misses = 0;
  for (const imageIndex of [...byImage.keys()].sort((a, b) => a - b)) {
    const path = imagePaths[imageIndex]!;
    const image = await decodeGrayImageFile(path);
    const stem = basename(path, extname(path));
    for (const { error, kind, folder: target, prefix } of byImage.get(imageIndex)!) {
      const png = await boxCropPng(image, error.box, windowWidth, windowHeight);
      if (png === undefined) continue;
      const [x, y, width] = error.box.map((v) => Math.round(v));
      const file = join(target, `${prefix}${stem}-x${x}-y${y}-w${width}.png`);
      await writeFileAtomic(file, png);
      lines.push(JSON.stringify({ kind, crop: file, image: path, box: error.box, ...(error.score === undefined ? {} : { score: error.score }) }));
      if (kind === 'false-alarm') falseAlarms++;
      else misses++;
    }
  }
  await writeFileAtomic(join(folder, 'errors.jsonl'), lines.length > 0 ? `${lines.join('\n')}\n` : '');
  return { falseAlarms, misses, falseAlarmFolder, missFolder };
}
