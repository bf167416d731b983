// (a) All 162,336 basic Haar-like features of a 24×24 window on real patches:
// rectboost's pooled response-matrix build against scikit-image's haar_like_feature,
// after checking that the two compute the same values.
import { join } from 'node:path';
import { readNpyFile } from '../../dist/data/npy-reader.js';
import { writeNpyFile } from '../../dist/data/npy-writer.js';
import { compileFeatures, evaluateCompiledFeature } from '../../dist/features/compiled-features.js';
import { enumerateFeatures } from '../../dist/features/enumerate-features.js';
import { computeIntegralImage, rectangleSum } from '../../dist/image/integral-image.js';
import { featurePatches, stackPixels } from './patch-sets.js';
import { runPeer } from './python-peer.js';
import { buildMatrixInPool, median } from './rectboost-side.js';

// scikit-image's feature types in the order peer_reference.py numbers them, as our kinds
// (same correspondence as test/features/skimage-reference.test.ts).
const KIND_OF_PEER_TYPE = ['two-horizontal', 'two-vertical', 'three-horizontal', 'three-vertical', 'four-diagonal'];

const keyOf = (f) => `${f.kind} ${f.x} ${f.y} ${f.cellWidth} ${f.cellHeight}`;

/**
 * scikit-image's value from ours (conventions measured in test/features/skimage-reference.test.ts):
 * two- and four-cell: skimage = −ours; three-cell: skimage = ours − centre cell sum
 * (skimage weights the centre +1, we weight it +2 to keep the feature zero-mean).
 */
function asPeerValue(feature, ours, integral) {
  if (feature.kind === 'three-horizontal') return ours - rectangleSum(integral.sum, integral.stride, feature.x + feature.cellWidth, feature.y, feature.cellWidth, feature.cellHeight);
  if (feature.kind === 'three-vertical') return ours - rectangleSum(integral.sum, integral.stride, feature.x, feature.y + feature.cellHeight, feature.cellWidth, feature.cellHeight);
  return -ours;
}

/** Compares every value; returns counts of features matched and values that differ. */
async function checkValues(patches, valuesPath, coordsPath) {
  const peerValues = await readNpyFile(valuesPath);
  const coords = await readNpyFile(coordsPath);
  const featureCount = coords.shape[0];
  const peerFeatures = [];
  for (let f = 0; f < featureCount; f++) {
    const [kind, x, y, cellWidth, cellHeight] = coords.data.subarray(f * 5, f * 5 + 5);
    peerFeatures.push({ kind: KIND_OF_PEER_TYPE[kind], x, y, cellWidth, cellHeight });
  }
  const ours = new Set(enumerateFeatures(24, 24).map(keyOf));
  const peerKeys = new Set(peerFeatures.map(keyOf));
  const sameSet = ours.size === peerKeys.size && [...peerKeys].every((key) => ours.has(key));
  const compiled = compileFeatures(peerFeatures, 25);
  let differing = 0;
  patches.forEach((patch, p) => {
    const integral = computeIntegralImage(patch);
    for (let f = 0; f < featureCount; f++) {
      const value = asPeerValue(peerFeatures[f], evaluateCompiledFeature(compiled, f, integral.sum, 0), integral);
      if (value !== peerValues.data[p * featureCount + f]) differing++;
    }
  });
  return { featureCount, ourFeatureCount: ours.size, sameSet, valuesCompared: patches.length * featureCount, differing };
}

/**
 * Runs comparison (a) on `patchCount` lfw_subset patches. `skimageSkip` is null or the
 * reason scikit-image cannot run. `repeats` rectboost timings are taken (median reported).
 */
export async function compareFeatures({ pool, patchCount, scratchFolder, skimageSkip, peerProcesses, repeats = 5 }) {
  const patches = await featurePatches(patchCount);
  const features = enumerateFeatures(24, 24);
  const half = patchCount / 2;
  // Warm-up: the first build pays for JIT compilation in every worker.
  await buildMatrixInPool(pool, features, patches.slice(0, half), patches.slice(half));
  const pooledSeconds = [];
  for (let r = 0; r < repeats; r++) pooledSeconds.push((await buildMatrixInPool(pool, features, patches.slice(0, half), patches.slice(half))).seconds);
  const result = {
    patches: patchCount,
    features: features.length,
    workers: pool.workers,
    rectboostSeconds: median(pooledSeconds),
    rectboostAllSeconds: pooledSeconds,
    peer: null,
    check: null,
    skipped: skimageSkip,
  };
  if (skimageSkip !== null) return result;
  const { shape, pixels } = stackPixels(patches);
  const patchesPath = join(scratchFolder, 'feature-patches.npy');
  const valuesPath = join(scratchFolder, 'skimage-values.npy');
  const coordsPath = join(scratchFolder, 'skimage-features.npy');
  await writeNpyFile(patchesPath, shape, pixels);
  result.peer = await runPeer(['haar', '--patches', patchesPath, '--values-out', valuesPath, '--coords-out', coordsPath, '--processes', String(peerProcesses)]);
  result.check = await checkValues(patches, valuesPath, coordsPath);
  return result;
}
