import { access } from 'node:fs/promises';
import { join } from 'node:path';
import { RectboostError } from '../errors.js';
import type { GrayImage } from '../image/gray-image.js';
import { readIdxFile } from './idx-reader.js';

/** Images and their class labels (0..9) of one Fashion-MNIST split. */
export interface FashionMnistSplit {
  readonly images: GrayImage[];
  readonly labels: Uint8Array;
}

/** Side of a Fashion-MNIST image in pixels (Xiao, Rasul & Vollgraf 2017, §2). */
export const FASHION_MNIST_SIDE = 28;

/**
 * Loads one split of Fashion-MNIST (Xiao, Rasul & Vollgraf 2017) from a folder holding
 * the files under their published names: `train-images-idx3-ubyte`, `train-labels-idx1-ubyte`,
 * `t10k-images-idx3-ubyte`, `t10k-labels-idx1-ubyte`, each gzip-compressed (`.gz`, preferred)
 * or raw. Images are 28×28 unsigned bytes; the returned images are views into one
 * shared buffer that this function allocates, so they cost no copy.
 * @param split 'train' (60,000 items) or 'test' (10,000 items).
 * @throws RectboostError `bad-data` when a file is missing or malformed, the images are
 *   not 28×28, the counts of images and labels differ, or a label is above 9.
 * @example const { images, labels } = await loadFashionMnist('reference-data/fashion-mnist', 'test');
 */
export async function loadFashionMnist(folder: string, split: 'train' | 'test'): Promise<FashionMnistSplit> {
  if (split !== 'train' && split !== 'test') {
    throw new RectboostError('invalid-option', `Fashion-MNIST split must be 'train' or 'test'; received ${JSON.stringify(split)}.`);
  }
  const prefix = split === 'train' ? 'train' : 't10k';
  const imageArray = await readIdxFile(await findFile(folder, `${prefix}-images-idx3-ubyte`));
  const labelArray = await readIdxFile(await findFile(folder, `${prefix}-labels-idx1-ubyte`));
  const [count, height, width] = imageArray.shape;
  if (imageArray.shape.length !== 3 || count === undefined || height !== FASHION_MNIST_SIDE || width !== FASHION_MNIST_SIDE) {
    throw new RectboostError('bad-data', `Fashion-MNIST ${split} images in ${folder} should be N × 28 × 28; they are ${imageArray.shape.join(' × ')}.`);
  }
  if (labelArray.shape.length !== 1 || labelArray.shape[0] !== count) {
    throw new RectboostError('bad-data', `Fashion-MNIST ${split} labels in ${folder} should be ${count} values, one per image; they are ${labelArray.shape.join(' × ')}.`);
  }
  const labels = labelArray.data;
  const badLabel = labels.findIndex((label) => label > 9);
  if (badLabel >= 0) {
    throw new RectboostError('bad-data', `Fashion-MNIST ${split} label ${badLabel} in ${folder} is ${labels[badLabel]}; labels must be 0 to 9.`);
  }
  const pixels = FASHION_MNIST_SIDE * FASHION_MNIST_SIDE;
  const images: GrayImage[] = [];
  for (let item = 0; item < count; item++) {
    images.push({ width: FASHION_MNIST_SIDE, height: FASHION_MNIST_SIDE, data: imageArray.data.subarray(item * pixels, (item + 1) * pixels) });
  }
  return { images, labels };
}

async function findFile(folder: string, name: string): Promise<string> {
  for (const candidate of [join(folder, `${name}.gz`), join(folder, name)]) {
    try {
      await access(candidate);
      return candidate;
    } catch {
      // try the next spelling
    }
  }
  throw new RectboostError('bad-data', `Fashion-MNIST file ${name}(.gz) is missing from ${folder}; run scripts/fetch-reference-data.sh or point to the folder that holds it.`);
}
