import { stat } from 'node:fs/promises';
import { RectboostError } from '../errors.js';
import type { GrayImage } from '../image/gray-image.js';
import { listImageFiles } from './list-images.js';
import { readImagesChecked, refuseBadImages } from './read-images.js';

export interface LoadedBackgrounds {
  readonly images: GrayImage[];
  readonly files: string[];
  readonly contentHash: string;
  readonly skipped: string[];
}

/**
 * Background images (no objects) from a folder, all checked before use.
 * @throws RectboostError `bad-data` for a missing or empty folder, or when no
 *   image is at least windowWidth × windowHeight; `bad-image` listing unreadable
 *   files unless skipBad.
 */
export async function loadBackgroundImages(
  path: string,
  options: { windowWidth: number; windowHeight: number; skipBad: boolean; maxPixels?: number; onProgress?: (done: number, total: number) => void },
): Promise<LoadedBackgrounds> {
  try {
    await stat(path);
  } catch (error) {
    throw new RectboostError('bad-data', `Backgrounds ${path} do not exist or cannot be read.`, { cause: error });
  }
  const files = await listImageFiles(path);
  if (files.length === 0) throw new RectboostError('bad-data', `Backgrounds ${path} hold no PNG, JPEG, TIFF or WebP images.`);
  const checked = await readImagesChecked(files, {
    root: path,
    ...(options.maxPixels === undefined ? {} : { maxPixels: options.maxPixels }),
    ...(options.onProgress === undefined ? {} : { onProgress: options.onProgress }),
  });
  const skipped = refuseBadImages('background images', checked, options.skipBad);
  const usable = checked.images.filter((image) => image.width >= options.windowWidth && image.height >= options.windowHeight);
  if (usable.length === 0) {
    throw new RectboostError(
      'bad-data',
      `Every background image in ${path} is smaller than the ${options.windowWidth}×${options.windowHeight} window; use larger backgrounds or a smaller --window.`,
    );
  }
  return { images: checked.images, files: checked.files, contentHash: checked.contentHash, skipped };
}
