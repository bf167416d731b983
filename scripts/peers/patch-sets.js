// The real patches every comparison runs on, built the same way for both sides:
// scikit-image's lfw_subset (100 faces, 100 non-faces, 25×25) and 24×24 crops of
// the scikit-image sample photos in reference-data/photos.
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import seedrandom from 'seedrandom';
import { loadLfwSubset } from '../../dist/data/lfw-subset.js';
import { cropGrayImage, mirrorGrayImage } from '../../dist/image/gray-image.js';
import { decodeGrayImageFile } from '../../dist/io/decode-image.js';

export const REFERENCE_DATA = new URL('../../reference-data/', import.meta.url).pathname;
export const LFW_PATH = join(REFERENCE_DATA, 'lfw_subset.npy');
const PHOTOS = join(REFERENCE_DATA, 'photos');

/** The 24×24 crops of a 25×25 patch at offsets (0,0), (1,0), (0,1), (1,1). */
function fourCrops(patch) {
  return [[0, 0], [1, 0], [0, 1], [1, 1]].map(([x, y]) => cropGrayImage(patch, x, y, 24, 24));
}

/**
 * Patches for the feature-value comparison: `count` lfw_subset items cut to 24×24
 * at offset (0, 0), half faces then half non-faces (count ≤ 200, even).
 */
export async function featurePatches(count) {
  const { faces, nonFaces } = await loadLfwSubset(LFW_PATH);
  const half = count / 2;
  return [...faces.slice(0, half), ...nonFaces.slice(0, half)].map((patch) => cropGrayImage(patch, 0, 0, 24, 24));
}

/**
 * Labelled 24×24 samples for the boosting-round comparison: 40% positives (lfw faces
 * at four offsets, then mirrored: at most 800), the rest negatives (lfw non-faces the
 * same way, then crops of the sample photos at seeded positions).
 */
export async function boostingSamples(sampleCount, seed = 'rectboost-peers') {
  const { faces, nonFaces } = await loadLfwSubset(LFW_PATH);
  const augment = (patches) => {
    const crops = patches.flatMap(fourCrops);
    return [...crops, ...crops.map(mirrorGrayImage)];
  };
  const faceCrops = augment(faces);
  const positiveCount = Math.min(faceCrops.length, Math.max(1, Math.round(sampleCount * 0.4)));
  const negativeCount = sampleCount - positiveCount;
  const negatives = augment(nonFaces).slice(0, negativeCount);
  if (negatives.length < negativeCount) {
    const random = seedrandom(seed);
    const photos = [];
    for (const name of readdirSync(PHOTOS).filter((file) => file.endsWith('.png')).sort()) {
      photos.push(await decodeGrayImageFile(join(PHOTOS, name)));
    }
    while (negatives.length < negativeCount) {
      const photo = photos[negatives.length % photos.length];
      const x = Math.floor(random() * (photo.width - 24 + 1));
      const y = Math.floor(random() * (photo.height - 24 + 1));
      negatives.push(cropGrayImage(photo, x, y, 24, 24));
    }
  }
  return { positives: faceCrops.slice(0, positiveCount), negatives };
}

/** lfw_subset at its own 25×25 size, split by index parity (even: train, odd: test). */
export async function faceSplit() {
  const { faces, nonFaces } = await loadLfwSubset(LFW_PATH);
  const parity = (items, wanted) => items.filter((_, index) => index % 2 === wanted);
  return {
    trainFaces: parity(faces, 0), trainOthers: parity(nonFaces, 0),
    testFaces: parity(faces, 1), testOthers: parity(nonFaces, 1),
  };
}

/** Packs equal-size gray images into one uint8 array, C order (count × height × width). */
export function stackPixels(images) {
  const { width, height } = images[0];
  const pixels = new Uint8Array(images.length * width * height);
  images.forEach((image, index) => pixels.set(image.data, index * width * height));
  return { shape: [images.length, height, width], pixels };
}
