import { RectboostError } from '../errors.js';
import type { GrayImage } from '../image/gray-image.js';
import { readNpyFile, type NpyArray } from './npy-reader.js';

/** Faces and non-faces of scikit-image's lfw_subset, as 8-bit gray images. */
export interface LfwSubset {
  readonly faces: GrayImage[];
  readonly nonFaces: GrayImage[];
}

/** Items of each class in lfw_subset.npy, per scikit-image's `skimage.data.lfw_subset` documentation. */
export const LFW_SUBSET_ITEMS_PER_CLASS = 100;
/** Side of each lfw_subset patch in pixels, per the same documentation. */
export const LFW_SUBSET_SIDE = 25;

/**
 * Loads `lfw_subset.npy`, the 200 × 25 × 25 float64 array that scikit-image ships
 * (values in [0, 1]; scikit-image's documentation of `skimage.data.lfw_subset`: the
 * first 100 images are faces, the next 100 are not), and converts each patch to
 * 8-bit gray as round(value × 255), clamped to 0..255.
 * @throws RectboostError `bad-data` when the file is missing or not a 200 × 25 × 25
 *   float array.
 * @example const { faces, nonFaces } = await loadLfwSubset('reference-data/lfw_subset.npy');
 */
export async function loadLfwSubset(path: string): Promise<LfwSubset> {
  return lfwSubsetFromArray(await readNpyFile(path), path);
}

/**
 * The conversion of loadLfwSubset on an already-read array (for callers that read
 * the file themselves); `label` names the source in errors.
 * @throws RectboostError `bad-data` unless the array is 200 × 25 × 25 float.
 */
export function lfwSubsetFromArray(array: NpyArray, label: string): LfwSubset {
  const [count, height, width] = array.shape;
  if (
    array.shape.length !== 3 || count !== 2 * LFW_SUBSET_ITEMS_PER_CLASS ||
    height !== LFW_SUBSET_SIDE || width !== LFW_SUBSET_SIDE || !(array.data instanceof Float64Array)
  ) {
    throw new RectboostError(
      'bad-data',
      `${label} should hold lfw_subset's 200 × 25 × 25 float array; it holds (${array.shape.join(', ')}) of '${array.dtype}'. Use the file from scikit-image's data folder.`,
    );
  }
  const pixels = LFW_SUBSET_SIDE * LFW_SUBSET_SIDE;
  const images: GrayImage[] = [];
  for (let item = 0; item < count; item++) {
    const data = new Uint8Array(pixels);
    for (let i = 0; i < pixels; i++) {
      data[i] = Math.min(255, Math.max(0, Math.round(array.data[item * pixels + i]! * 255)));
    }
    images.push({ width: LFW_SUBSET_SIDE, height: LFW_SUBSET_SIDE, data });
  }
  return { faces: images.slice(0, LFW_SUBSET_ITEMS_PER_CLASS), nonFaces: images.slice(LFW_SUBSET_ITEMS_PER_CLASS) };
}
