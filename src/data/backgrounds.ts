// TEMPORARY stand-in (detect branch): the trainer's branch owns this file and
// replaces it on merge.
import { RectboostError } from '../errors.js';
import type { GrayImage } from '../image/gray-image.js';
import { decodeGrayImageFile } from '../io/decode-image.js';
import { listImageFiles } from './list-images.js';

/** Every image under a background folder, decoded to gray. */
export async function loadBackgroundImages(folder: string): Promise<GrayImage[]> {
  const files = await listImageFiles(folder);
  if (files.length === 0) throw new RectboostError('bad-data', `No background images under ${folder}.`);
  const images: GrayImage[] = [];
  for (const file of files) images.push(await decodeGrayImageFile(file));
  return images;
}
