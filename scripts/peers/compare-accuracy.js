// (c) Test accuracy on lfw_subset (25×25; even items train, odd items test): rectboost's
// Discrete AdaBoost over its 8-bit response matrix (one boosted stage, no cascade)
// against scikit-learn's SAMME AdaBoost with depth-1 trees on the same float values.
import { join } from 'node:path';
import { boostRounds } from '../../dist/boost/adaboost.js';
import { buildResponseMatrix } from '../../dist/boost/response-matrix.js';
import { writeNpyFile } from '../../dist/data/npy-writer.js';
import { compileFeatures, evaluateCompiledFeature } from '../../dist/features/compiled-features.js';
import { enumerateFeatures } from '../../dist/features/enumerate-features.js';
import { packWindowSamples } from '../../dist/features/window-samples.js';
import { faceSplit } from './patch-sets.js';
import { runPeer } from './python-peer.js';
import { normalizedValues } from './rectboost-side.js';

/**
 * Area under the ROC curve as the Mann–Whitney statistic: the share of (positive,
 * negative) pairs the scores order correctly, ties counting one half (Hanley & McNeil 1982).
 */
function areaUnderRoc(positiveScores, negativeScores) {
  let wins = 0;
  for (const p of positiveScores) for (const n of negativeScores) wins += p > n ? 1 : p === n ? 0.5 : 0;
  return wins / (positiveScores.length * negativeScores.length);
}

/** Running scores of the boosted stumps on windows, after each round. */
function scoresByRound(rounds, features, samples) {
  const compiled = compileFeatures(rounds.map((round) => features[round.stump.feature]), samples.windowWidth + 1);
  const scores = new Float64Array(samples.count);
  const byRound = [];
  rounds.forEach((round, r) => {
    for (let i = 0; i < samples.count; i++) {
      const value = evaluateCompiledFeature(compiled, r, samples.tables, i * samples.tableSize) * samples.inverseStandardDeviations[i];
      scores[i] += value < round.splitValue ? round.stump.belowOutput : round.stump.aboveOutput;
    }
    byRound.push(Float64Array.from(scores));
  });
  return byRound;
}

/** Runs comparison (c) for each round count in `roundCounts` (ascending). */
export async function compareAccuracy({ roundCounts, scratchFolder, sklearnSkip }) {
  const split = await faceSplit();
  const side = split.trainFaces[0].width;
  const pack = (images) => packWindowSamples(images, side, side);
  const trainFaces = pack(split.trainFaces);
  const trainOthers = pack(split.trainOthers);
  const testFaces = pack(split.testFaces);
  const testOthers = pack(split.testOthers);
  const features = enumerateFeatures(side, side);
  const maxRounds = Math.max(...roundCounts);

  const start = performance.now();
  const matrix = buildResponseMatrix(features, trainFaces, trainOthers);
  // Uniform starting weights as scikit-learn (the classes are balanced, 50/50, so
  // Viola & Jones's balanced start would be the same).
  const boosted = boostRounds(matrix, { booster: 'discrete', rounds: maxRounds, initialWeights: 'uniform' });
  const trainSeconds = (performance.now() - start) / 1000;
  const faceScores = scoresByRound(boosted.rounds, features, testFaces);
  const otherScores = scoresByRound(boosted.rounds, features, testOthers);
  const byRounds = {};
  for (const rounds of roundCounts) {
    const used = Math.min(rounds, boosted.rounds.length) - 1;
    if (used < 0) continue;
    // A window is a face when its score is above 0, the sign rule of Discrete AdaBoost
    // (a score of exactly 0 counts as non-face, as in scikit-learn's binary SAMME predict).
    const faces = faceScores[used];
    const others = otherScores[used];
    const correct = faces.filter((s) => s > 0).length + others.filter((s) => !(s > 0)).length;
    byRounds[rounds] = { accuracy: correct / (faces.length + others.length), areaUnderRoc: areaUnderRoc(faces, others), roundsUsed: used + 1 };
  }
  const result = {
    window: side,
    features: features.length,
    train: { faces: trainFaces.count, others: trainOthers.count },
    test: { faces: testFaces.count, others: testOthers.count },
    rectboost: { trainSeconds, stoppedBecause: boosted.stoppedBecause, roundsBoosted: boosted.rounds.length, byRounds },
    peer: null,
    skipped: sklearnSkip,
  };
  if (sklearnSkip !== null) return result;

  const labels = (faces, others) => {
    const out = new Uint8Array(faces + others);
    out.fill(1, 0, faces);
    return out;
  };
  const paths = {
    train: join(scratchFolder, 'faces-train.npy'), trainLabels: join(scratchFolder, 'faces-train-labels.npy'),
    test: join(scratchFolder, 'faces-test.npy'), testLabels: join(scratchFolder, 'faces-test-labels.npy'),
  };
  const trainCount = trainFaces.count + trainOthers.count;
  const testCount = testFaces.count + testOthers.count;
  await writeNpyFile(paths.train, [features.length, trainCount], normalizedValues(features, trainFaces, trainOthers));
  await writeNpyFile(paths.test, [features.length, testCount], normalizedValues(features, testFaces, testOthers));
  await writeNpyFile(paths.trainLabels, [trainCount], labels(trainFaces.count, trainOthers.count));
  await writeNpyFile(paths.testLabels, [testCount], labels(testFaces.count, testOthers.count));
  result.peer = await runPeer(['adaboost-accuracy', '--train', paths.train, '--train-labels', paths.trainLabels,
    '--test', paths.test, '--test-labels', paths.testLabels, '--rounds', roundCounts.join(',')]);
  return result;
}
