import { stat } from 'node:fs/promises';
import { RectboostError } from '../errors.js';
import { mirrorGrayImage, resizeGrayImage, type GrayImage } from '../image/gray-image.js';
import { listImageFiles } from './list-images.js';
import { readImagesChecked, refuseBadImages, type CheckedImages } from './read-images.js';

export interface PositiveLoadOptions {
  readonly windowWidth: number;
  readonly windowHeight: number;
  /** Add a left-right mirrored copy of every patch. */
  readonly mirror: boolean;
  readonly skipBad: boolean;
  readonly maxPixels?: number;
  readonly onProgress?: (done: number, total: number) => void;
}

export interface LoadedPositives {
  /** Windows of windowWidth × windowHeight, mirrored copies after the originals. */
  readonly windows: GrayImage[];
  /** Number of source patches (before mirroring). */
  readonly sourceCount: number;
  readonly contentHash: string;
  /** Lines describing skipped bad files (with skipBad). */
  readonly skipped: string[];
}

/**
 * Positive windows from a folder of patch images: every image converted to
 * gray and resized to the detector window (bilinear), optionally mirrored.
 * @throws RectboostError `bad-data` for a missing folder or a folder without
 *   images; `bad-image` listing unreadable files unless skipBad.
 */
export async function loadPositiveWindows(path: string, options: PositiveLoadOptions): Promise<LoadedPositives> {
  let info;
  try {
    info = await stat(path);
  } catch (error) {
    throw new RectboostError('bad-data', `Positives ${path} do not exist or cannot be read.`, { cause: error });
  }
  if (!info.isDirectory()) {
    throw new RectboostError('bad-data', `Positives ${path} must be a folder of patch images.`);
  }
  const files = await listImageFiles(path);
  if (files.length === 0) throw new RectboostError('bad-data', `Positives folder ${path} holds no PNG, JPEG, TIFF or WebP images.`);
  const checked: CheckedImages = await readImagesChecked(files, {
    root: path,
    ...(options.maxPixels === undefined ? {} : { maxPixels: options.maxPixels }),
    ...(options.onProgress === undefined ? {} : { onProgress: options.onProgress }),
  });
  const skipped = refuseBadImages('positive images', checked, options.skipBad);
  const windows = checked.images.map((image) => resizeGrayImage(image, options.windowWidth, options.windowHeight));
  const all = options.mirror ? [...windows, ...windows.map(mirrorGrayImage)] : windows;
  return { windows: all, sourceCount: windows.length, contentHash: checked.contentHash, skipped };
}
