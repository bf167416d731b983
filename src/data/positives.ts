import { stat } from 'node:fs/promises';
import { RectboostError } from '../errors.js';
import { readFile } from 'node:fs/promises';
import { createHash } from 'node:crypto';
import { dirname } from 'node:path';
import { cropBoxToWindow, mirrorGrayImage, resizeGrayImage, type GrayImage } from '../image/gray-image.js';
import { loadAnnotations } from './annotations.js';
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
  /** Where each source patch came from (sourceCount entries): its file, and for annotated images the box too. */
  readonly sources: string[];
  readonly contentHash: string;
  /** Lines describing skipped bad files (with skipBad). */
  readonly skipped: string[];
}

/**
 * Positive windows from an annotation file (DESIGN §3: JSON Lines or COCO-style):
 * every box is cropped from its image (rounded to whole pixels, clipped to the
 * image) and resized to the window. The content hash covers the annotation file
 * and every image it names.
 */
async function loadAnnotatedPositives(path: string, options: PositiveLoadOptions): Promise<LoadedPositives> {
  const annotated = await loadAnnotations(path);
  const files = annotated.map((entry) => entry.image);
  const checked = await readImagesChecked(files, {
    root: dirname(path),
    ...(options.maxPixels === undefined ? {} : { maxPixels: options.maxPixels }),
    ...(options.onProgress === undefined ? {} : { onProgress: options.onProgress }),
  });
  const skipped = refuseBadImages('annotated images', checked, options.skipBad);
  const byFile = new Map(checked.files.map((file, i) => [file, checked.images[i]!]));
  const windows: GrayImage[] = [];
  const sources: string[] = [];
  for (const entry of annotated) {
    const image = byFile.get(entry.image);
    if (image === undefined) continue;
    for (const box of entry.boxes) {
      const window = cropBoxToWindow(image, box, options.windowWidth, options.windowHeight);
      if (window === undefined) continue;
      windows.push(window);
      sources.push(`${entry.image} [${box.join(', ')}]`);
    }
  }
  if (windows.length === 0) throw new RectboostError('bad-data', `Annotation file ${path} has no boxes inside its images.`);
  const hash = createHash('sha256').update(await readFile(path)).update(checked.contentHash).digest('hex');
  const all = options.mirror ? [...windows, ...windows.map(mirrorGrayImage)] : windows;
  return { windows: all, sourceCount: windows.length, sources, contentHash: hash, skipped };
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
    if (/\.jsonl?$/i.test(path)) return loadAnnotatedPositives(path, options);
    throw new RectboostError('bad-data', `Positives ${path} must be a folder of patch images or an annotation file (.jsonl or COCO-style .json).`);
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
  return { windows: all, sourceCount: windows.length, sources: checked.files, contentHash: checked.contentHash, skipped };
}
