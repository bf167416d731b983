import { readFileSync } from 'node:fs';
import { REFERENCE_DATA } from '../data/reference-files.js';
import { lfwSubsetFromArray } from '../../src/data/lfw-subset.js';
import { readNpy } from '../../src/data/npy-reader.js';
import type { GrayImage } from '../../src/image/gray-image.js';

/**
 * scikit-image's lfw_subset.npy (Debian python3-skimage; fetched into reference-data/ by
 * scripts/fetch-reference-data.sh): 200 patches of 25×25 float64 in [0, 1], the first 100
 * faces from Labeled Faces in the Wild, the last 100 non-faces (skimage.data.lfw_subset docs).
 */
export const LFW_PATH = REFERENCE_DATA + 'lfw_subset.npy';

/** The patches as 8-bit images (loadLfwSubset's conversion), split: even indices train, odd test. */
export function loadLfwPatches(): { trainFaces: GrayImage[]; testFaces: GrayImage[]; trainOthers: GrayImage[]; testOthers: GrayImage[] } {
  const { faces, nonFaces } = lfwSubsetFromArray(readNpy(readFileSync(LFW_PATH), LFW_PATH), LFW_PATH);
  const pick = (images: GrayImage[], parity: number): GrayImage[] => images.filter((_, i) => i % 2 === parity);
  return { trainFaces: pick(faces, 0), testFaces: pick(faces, 1), trainOthers: pick(nonFaces, 0), testOthers: pick(nonFaces, 1) };
}
