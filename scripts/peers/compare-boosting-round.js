// (b) One round of depth-1-tree AdaBoost over the same feature matrix: rectboost's
// histogram split search (all workers, and one thread) against scikit-learn's
// AdaBoostClassifier(DecisionTreeClassifier(max_depth=1), n_estimators=1, SAMME).fit.
import { join } from 'node:path';
import { createSplitScratch } from '../../dist/boost/best-split.js';
import { writeNpyFile } from '../../dist/data/npy-writer.js';
import { enumerateFeatures } from '../../dist/features/enumerate-features.js';
import { boostingSamples } from './patch-sets.js';
import { runPeer } from './python-peer.js';
import { boostingRound, buildMatrixInPool, checkMatrixAgainstValues, median, normalizedValues, uniformWeights } from './rectboost-side.js';

/** Runs comparison (b) on `sampleCount` labelled 24×24 samples. */
export async function compareBoostingRound({ pool, sampleCount, rounds, scratchFolder, sklearnSkip, layouts }) {
  const { positives: positiveImages, negatives: negativeImages } = await boostingSamples(sampleCount);
  const features = enumerateFeatures(24, 24);
  const { matrix, seconds: matrixSeconds, positives, negatives } = await buildMatrixInPool(pool, features, positiveImages, negativeImages);

  // Rounds in the pool, then the same rounds in this thread from the same start.
  const pooled = [];
  let weights = uniformWeights(matrix);
  let firstStump = null;
  for (let r = 0; r < rounds; r++) {
    const start = performance.now();
    const round = await boostingRound(matrix, weights, pool, null);
    pooled.push(performance.now() - start);
    firstStump ??= round.stump;
    weights = round.weights;
  }
  const oneThread = [];
  weights = uniformWeights(matrix);
  const scratch = createSplitScratch();
  for (let r = 0; r < rounds; r++) {
    const start = performance.now();
    const round = await boostingRound(matrix, weights, null, scratch);
    oneThread.push(performance.now() - start);
    weights = round.weights;
  }
  const result = {
    samples: matrix.sampleCount,
    positives: matrix.positiveCount,
    features: matrix.featureCount,
    workers: pool.workers,
    matrixSeconds,
    pooledRoundMilliseconds: median(pooled),
    pooledRoundsMilliseconds: pooled,
    oneThreadRoundMilliseconds: median(oneThread),
    oneThreadRoundsMilliseconds: oneThread,
    firstStump: firstStump === null ? null : { feature: firstStump.feature, weightedError: firstStump.weightedError },
    matrixCheck: null,
    peer: null,
    skipped: sklearnSkip,
  };
  if (sklearnSkip !== null) return result;

  const values = normalizedValues(features, positives, negatives);
  result.matrixCheck = checkMatrixAgainstValues(matrix, features, positives, negatives, 97);
  const matrixPath = join(scratchFolder, 'round-matrix.npy');
  const labelsPath = join(scratchFolder, 'round-labels.npy');
  await writeNpyFile(matrixPath, [features.length, matrix.sampleCount], values);
  const labels = new Uint8Array(matrix.sampleCount);
  labels.fill(1, 0, matrix.positiveCount);
  await writeNpyFile(labelsPath, [matrix.sampleCount], labels);
  result.peer = await runPeer(['adaboost-round', '--matrix', matrixPath, '--labels', labelsPath, '--layouts', layouts]);
  return result;
}
