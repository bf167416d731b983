// TEMPORARY stand-in (detect branch): the trainer's branch owns this file and
// replaces it on merge. Folder of patches only, each resized to the window.
import { RectboostError } from '../errors.js';
import { mirrorGrayImage, resizeGrayImage, type GrayImage } from '../image/gray-image.js';
import { decodeGrayImageFile } from '../io/decode-image.js';
import { listImageFiles } from './list-images.js';

/** Positive windows from a folder of patch images, resized to the window (and mirrored copies when asked). */
export async function loadPositiveWindows(
  pathOrAnnotationFile: string,
  options: { windowWidth: number; windowHeight: number; mirror: boolean },
): Promise<GrayImage[]> {
  const files = await listImageFiles(pathOrAnnotationFile);
  if (files.length === 0) throw new RectboostError('bad-data', `No positive images under ${pathOrAnnotationFile}.`);
  const windows: GrayImage[] = [];
  for (const file of files) {
    const window = resizeGrayImage(await decodeGrayImageFile(file), options.windowWidth, options.windowHeight);
    windows.push(window);
    if (options.mirror) windows.push(mirrorGrayImage(window));
  }
  return windows;
}
