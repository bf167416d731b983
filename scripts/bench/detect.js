// Detection speed on one core: a 640×480 natural photo (scikit-image's
// motorcycle_left.png from reference-data/photos, centre-cropped), scale step
// 1.25, shift 1. Until the trainer lands, the cascade is built here: seeded
// random features in stages of 2, 10, 25, 25, 50 weak classifiers (the sizes of
// the first stages in Viola & Jones 2004, from memory), each stage's
// threshold set on windows of this image drawn at random scales so that about
// half of the windows reaching it pass (the design's default stage
// false-positive rate, 0.5). Random features separate nothing, so this is a
// load test of the scan, not a detector.
import { existsSync } from 'node:fs';
import seedrandom from 'seedrandom';
import {
  computeIntegralImage, cropGrayImage, decodeGrayImageFile, detectorCascadeFromModel, enumerateFeatures,
  mergeDetections, packWindowSamples, resizeGrayImage, scanImage,
} from '../../dist/index.js';
// stageScores is the trainer's; imported directly so both export blocks stay independent.
import { stageScores } from '../../dist/cascade/stage-score.js';

export const title = 'Multiscale detection, one core, 640×480 photo';

const PHOTO = new URL('../../reference-data/photos/motorcycle_left.png', import.meta.url).pathname;

function benchCascade(image) {
  const random = seedrandom('bench-detect');
  const features = enumerateFeatures(24, 24);
  const probes = [];
  for (let i = 0; i < 3000; i++) {
    const side = Math.round(24 * 1.25 ** Math.floor(random() * 8));
    const x = Math.floor(random() * (image.width - side));
    const y = Math.floor(random() * (image.height - side));
    probes.push(resizeGrayImage(cropGrayImage(image, x, y, side, side), 24, 24));
  }
  let samples = packWindowSamples(probes, 24, 24);
  let alive = probes;
  const stages = [];
  for (const size of [2, 10, 25, 25, 50]) {
    const weakClassifiers = Array.from({ length: size }, () => ({
      feature: features[Math.floor(random() * features.length)],
      splitValue: (random() - 0.5) * 2,
      belowOutput: -(0.2 + random()),
      aboveOutput: 0.2 + random(),
    }));
    const stage = { threshold: 0, weakClassifiers };
    const scores = Array.from(stageScores(stage, samples)).sort((a, b) => a - b);
    // The median score, moved up to the next distinct score when ties would let more than half pass.
    let threshold = scores[Math.floor(scores.length / 2)];
    if (scores.filter((v) => v >= threshold).length > scores.length / 2) threshold = scores.find((v) => v > threshold) ?? threshold;
    stage.threshold = threshold;
    stages.push(stage);
    const unsorted = stageScores(stage, samples);
    const kept = alive.filter((_, i) => unsorted[i] >= stage.threshold);
    alive = kept.length > 50 ? kept : alive;
    samples = packWindowSamples(alive, 24, 24);
  }
  return { format: 'rectboost-cascade', version: 1, window: { width: 24, height: 24 }, normalization: 'window-standard-deviation', featureSet: 'basic', stages };
}

export async function run() {
  if (!existsSync(PHOTO)) {
    console.log(`skipped: ${PHOTO} is missing (run scripts/fetch-reference-data.sh)`);
    return;
  }
  const photo = await decodeGrayImageFile(PHOTO);
  const image = cropGrayImage(photo, Math.floor((photo.width - 640) / 2), Math.floor((photo.height - 480) / 2), 640, 480);
  const cascade = detectorCascadeFromModel(benchCascade(image));
  const repeats = 10;
  let start = performance.now();
  for (let i = 0; i < repeats; i++) computeIntegralImage(image);
  const integralMs = (performance.now() - start) / repeats;
  const integral = computeIntegralImage(image);
  scanImage(cascade, integral, { scaleStep: 1.25, shift: 1 }); // warm-up
  start = performance.now();
  let result;
  for (let i = 0; i < repeats; i++) {
    result = scanImage(cascade, computeIntegralImage(image), { scaleStep: 1.25, shift: 1 });
  }
  const scanMs = (performance.now() - start) / repeats;
  const { statistics, hits } = result;
  const detections = mergeDetections(hits, { method: 'nms', overlap: 0.3 });
  const perWindow = statistics.featuresEvaluated / statistics.windowsScanned;
  console.log(`cascade: stages of ${cascade.stages.map((s) => s.weakClassifiers.length).join(', ')} weak classifiers`);
  console.log(`integral image (sum + squared): ${integralMs.toFixed(2)} ms per 640×480 image`);
  console.log(`detection (integral image + scan, ${statistics.scales} scales): ${scanMs.toFixed(1)} ms per image`);
  console.log(`windows: ${statistics.windowsScanned.toLocaleString('en-US')} per image, ${(statistics.windowsScanned / (scanMs / 1000) / 1e6).toFixed(1)} million windows/s on one core`);
  console.log(`cost: ${(scanMs * 1e6 / statistics.windowsScanned).toFixed(0)} ns per window, ${(scanMs * 1e6 / statistics.featuresEvaluated).toFixed(1)} ns per weak classifier evaluated`);
  console.log(`mean weak classifiers evaluated per window: ${perWindow.toFixed(2)}; rejected by stage: ${statistics.rejectedAtStage.join(', ')}; flat ${statistics.flatWindows}; accepted ${statistics.accepted} (${detections.length} after nms)`);
}
