// rectboost's half of the comparisons, through the public API in dist/: the
// response matrix built by the worker pool (DESIGN.md §4), boosting rounds over it,
// and the plain variance-normalized values that the Python peers receive.
import { decideRound, stumpOutputs } from '../../dist/boost/adaboost.js';
import { searchBestSplit } from '../../dist/boost/best-split.js';
import { initialWeights, updateWeights } from '../../dist/boost/booster.js';
import { quantizeResponses } from '../../dist/boost/response-bins.js';
import { packSampleColumns } from '../../dist/boost/sample-columns.js';
import { compileFeatures, evaluateCompiledFeature } from '../../dist/features/compiled-features.js';
import { packWindowSamples } from '../../dist/features/window-samples.js';

const shared = (bytes) => new SharedArrayBuffer(bytes);

function copyShared(source) {
  const copy = new source.constructor(shared(source.byteLength));
  copy.set(source);
  return copy;
}

/**
 * Integral images, sample columns and the quantized response matrix of every feature
 * on positives then negatives, built by `pool` exactly as trainStage builds it.
 * Returns the matrix and the wall-clock seconds of the whole computation.
 */
export async function buildMatrixInPool(pool, features, positiveImages, negativeImages) {
  const start = performance.now();
  const positives = packWindowSamples(positiveImages, 24, 24);
  const negatives = packWindowSamples(negativeImages, 24, 24);
  const samples = packSampleColumns(positives, negatives, shared);
  const compiled = compileFeatures(features, 25);
  const featureCount = features.length;
  const matrix = {
    featureCount,
    sampleCount: samples.sampleCount,
    positiveCount: samples.positiveCount,
    bins: new Uint8Array(shared(featureCount * samples.sampleCount)),
    minimums: new Float64Array(shared(8 * featureCount)),
    binWidths: new Float64Array(shared(8 * featureCount)),
  };
  await pool.buildMatrix({
    ...samples,
    starts: copyShared(compiled.starts),
    offsets: copyShared(compiled.offsets),
    coefficients: copyShared(compiled.coefficients),
    bins: matrix.bins,
    minimums: matrix.minimums,
    binWidths: matrix.binWidths,
  }, featureCount);
  return { matrix, seconds: (performance.now() - start) / 1000, positives, negatives };
}

/**
 * Every feature's variance-normalized value (raw · 1/σ, the value the response matrix
 * quantizes) on positives then negatives, feature-major: `values[f · n + s]`, float32.
 */
export function normalizedValues(features, positives, negatives) {
  const sampleCount = positives.count + negatives.count;
  const compiled = compileFeatures(features, positives.windowWidth + 1);
  const values = new Float32Array(features.length * sampleCount);
  const sets = [positives, negatives];
  for (let f = 0; f < features.length; f++) {
    let s = 0;
    for (const set of sets) {
      for (let i = 0; i < set.count; i++, s++) {
        values[f * sampleCount + s] = evaluateCompiledFeature(compiled, f, set.tables, i * set.tableSize) * set.inverseStandardDeviations[i];
      }
    }
  }
  return values;
}

/**
 * Checks that the exported values are the ones the matrix was quantized from:
 * re-quantizes every `step`-th feature row (from Float64 values, as the pool does) and
 * compares the bins. Returns the number of rows checked and of rows that differ.
 */
export function checkMatrixAgainstValues(matrix, features, positives, negatives, step) {
  const n = matrix.sampleCount;
  const compiled = compileFeatures(features, positives.windowWidth + 1);
  const row = new Float64Array(n);
  const bins = new Uint8Array(n);
  let checked = 0;
  let differing = 0;
  for (let f = 0; f < features.length; f += step) {
    let s = 0;
    for (const set of [positives, negatives]) {
      for (let i = 0; i < set.count; i++, s++) row[s] = evaluateCompiledFeature(compiled, f, set.tables, i * set.tableSize) * set.inverseStandardDeviations[i];
    }
    quantizeResponses(row, n, bins, 0);
    checked++;
    for (let k = 0; k < n; k++) {
      if (bins[k] !== matrix.bins[f * n + k]) {
        differing++;
        break;
      }
    }
  }
  return { checked, differing };
}

/**
 * One Discrete AdaBoost round over the matrix: best split (in the pool, or in this
 * thread when pool is null), outputs, weight update. Returns the stump and new weights.
 */
export async function boostingRound(matrix, weights, pool, scratch) {
  const { bins, featureCount, sampleCount, positiveCount } = matrix;
  const candidate = pool === null
    ? searchBestSplit(bins, sampleCount, positiveCount, weights, 'discrete', 0, featureCount, scratch)
    : await pool.searchSplit({ bins, featureCount, sampleCount, positiveCount, weights, booster: 'discrete' });
  const outcome = decideRound(candidate, 'discrete');
  if (outcome.kind === 'stop' && outcome.reason === 'no-better-than-chance') return { stump: null, weights };
  const next = new Float64Array(shared(8 * sampleCount));
  next.set(updateWeights(weights, stumpOutputs(matrix, outcome.stump), positiveCount));
  return { stump: outcome.stump, weights: next };
}

/** Uniform starting weights (as scikit-learn's AdaBoost), in shared memory for the pool. */
export function uniformWeights(matrix) {
  const weights = new Float64Array(shared(8 * matrix.sampleCount));
  weights.set(initialWeights(matrix.positiveCount, matrix.sampleCount - matrix.positiveCount, 'uniform'));
  return weights;
}

/** Median of a list of numbers. */
export function median(values) {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}
