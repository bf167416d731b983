// npm run bench -- accuracy: trains small cascades with each training option on three real
// tasks and prints patch ROC area, detection rate at 1 % false positives and scene average
// precision side by side, to choose defaults by measurement. Seeded: the figures reproduce.
// About 10–15 minutes on 2 cores. Only run when named (`npm run bench` alone skips it).
//
// Tasks and their data (nothing here is tuned to one of them; all use the same settings style):
// - Fashion-MNIST shirt (class 6) against the rest: Xiao, Rasul & Vollgraf 2017, Debian
//   dataset-fashion-mnist (reference-data/fashion-mnist/). Shirt is the class most often
//   confused with T-shirt/top (0), pullover (2) and coat (4); those are the confuser patches.
// - Faces: lfw_subset.npy from Debian python3-skimage (100 faces, 100 non-faces, 25×25), with
//   scikit-image's face-free sample photos as backgrounds; non-faces 0–49 are the negative
//   patches of the "+ patches" run, non-faces 50–99 are the test negatives of every run.
// - The demo (rivets, invented, demo-patches/): 1,000 positives train, the other 200 and 3,000
//   windows of 6 fresh panels from the demo generator (seed 7, not in demo-patches) are the
//   patch test; the 8 committed test panels are the scenes.
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import seedrandom from 'seedrandom';
import { trainCascade } from '../../dist/cascade/build-cascade.js';
import { BackgroundWindows, sampleUniformNegatives } from '../../dist/cascade/negative-mining.js';
import { loadAnnotations } from '../../dist/data/annotations.js';
import { loadFashionMnist } from '../../dist/data/fashion-mnist.js';
import { loadLfwSubset } from '../../dist/data/lfw-subset.js';
import { listImageFiles } from '../../dist/data/list-images.js';
import { cascadeUsesTiltedFeatures, detectorCascadeFromModel } from '../../dist/detect/detector-cascade.js';
import { mergeDetections } from '../../dist/detect/merge-detections.js';
import { scanImage } from '../../dist/detect/scan-image.js';
import { packWindowSamples } from '../../dist/features/window-samples.js';
import { resizeGrayImage } from '../../dist/image/gray-image.js';
import { computeIntegralImage } from '../../dist/image/integral-image.js';
import { decodeGrayImageFile } from '../../dist/io/decode-image.js';
import { evaluateDetections } from '../../dist/metrics/detection-evaluation.js';
import { evaluatePatches } from '../../dist/metrics/patch-evaluation.js';
import { truePositiveRateAt } from '../../dist/metrics/roc-curve.js';
import { createBoostingPool } from '../../dist/parallel/boosting-pool.js';
import { generateBackground } from '../demo/generate.js';

export const title = 'Detector accuracy by training option (real data; choose defaults from it)';
export const onlyWhenNamed = true;

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const DATA = join(ROOT, 'reference-data');

/** Training options every run shares; each variant adds its one option. */
const VARIANTS = [
  { key: 'baseline', name: 'baseline', extra: () => ({}) },
  { key: 'patches', name: '+ negative patches', extra: (task) => (task.patches === undefined ? undefined : { negativePatches: task.patches }) },
  { key: 'augment', name: '+ augment 2', extra: () => ({ augmentCopies: 2 }) },
  { key: 'mirror', name: '+ mirror', extra: () => ({ mirror: true }) },
  { key: 'depth2', name: 'trees of depth 2', extra: () => ({ weakDepth: 2 }) },
  { key: 'depth3', name: 'trees of depth 3', extra: () => ({ weakDepth: 3 }) },
  { key: 'extended', name: '+ extended features', extra: () => ({ featureSet: 'extended' }) },
];

function mosaics(items, labels, objectLabel, side = 28, across = 8) {
  const per = across * across;
  const width = across * side;
  return Array.from({ length: Math.floor(items.length / per) }, (_, m) => {
    const data = new Uint8Array(width * width);
    const truth = [];
    for (let k = 0; k < per; k++) {
      const item = items[m * per + k];
      const left = (k % across) * side;
      const top = Math.floor(k / across) * side;
      for (let row = 0; row < side; row++) data.set(item.data.subarray(row * side, (row + 1) * side), (top + row) * width + left);
      if (labels[m * per + k] === objectLabel) truth.push([left, top, side, side]);
    }
    return { image: { width, height: width, data }, truth };
  });
}

async function fashionShirtTask() {
  const SHIRT = 6;
  const LOOK_ALIKES = [0, 2, 4];
  const train = await loadFashionMnist(join(DATA, 'fashion-mnist'), 'train');
  const test = await loadFashionMnist(join(DATA, 'fashion-mnist'), 'test');
  const shirts = [];
  const others = [];
  const confusers = [];
  train.images.forEach((item, i) => {
    const label = train.labels[i];
    if (label === SHIRT) {
      if (shirts.length < 600) shirts.push(item);
    } else if (others.length < 24 * 64) others.push(item);
    else if (LOOK_ALIKES.includes(label) && confusers.length < 600) confusers.push(item);
  });
  return {
    name: 'Fashion-MNIST shirt vs rest',
    side: 28,
    positives: shirts,
    backgrounds: mosaics(others, [], -1).map((s) => s.image),
    patches: confusers,
    testPositives: test.images.filter((_, i) => test.labels[i] === SHIRT),
    testNegatives: test.images.filter((_, i) => test.labels[i] !== SHIRT),
    scenes: mosaics(test.images.slice(0, 12 * 64), Array.from(test.labels.subarray(0, 12 * 64)), SHIRT),
    scan: { smallestSide: 28, largestSide: 28 },
    merge: { method: 'nms', overlap: 0.3 },
    settings: { stageDetectionRate: 0.99, stageFalsePositiveRate: 0.5, targetFalsePositiveRate: 1e-4, maxStages: 8, maxWeakClassifiers: 30, negativesPerStage: 1000, validationShare: 0.3, seed: 11, memoryBytes: 30e6 },
  };
}

async function facesTask() {
  const subset = await loadLfwSubset(join(DATA, 'lfw_subset.npy'));
  const photos = ['brick.png', 'grass.png', 'gravel.png', 'moon.png', 'page.png', 'text.png', 'rocket.jpg', 'coffee.png', 'horse.png', 'motorcycle_left.png', 'chelsea.png'];
  return {
    name: 'lfw_subset faces',
    side: 25,
    positives: subset.faces.filter((_, i) => i % 2 === 0),
    backgrounds: await Promise.all(photos.map((name) => decodeGrayImageFile(join(DATA, 'photos', name)))),
    patches: subset.nonFaces.slice(0, 50),
    testPositives: subset.faces.filter((_, i) => i % 2 === 1),
    testNegatives: subset.nonFaces.slice(50),
    scenes: undefined,
    settings: { stageDetectionRate: 0.99, stageFalsePositiveRate: 0.5, targetFalsePositiveRate: 1e-4, maxStages: 4, maxWeakClassifiers: 40, negativesPerStage: 400, validationShare: 0.3, seed: 7, memoryBytes: 15e6 },
  };
}

async function demoTask() {
  const side = 20;
  const files = await listImageFiles(join(ROOT, 'demo-patches', 'positives'));
  const positives = await Promise.all(files.map(async (file) => resizeGrayImage(await decodeGrayImageFile(file), side, side)));
  const backgroundFiles = await listImageFiles(join(ROOT, 'demo-patches', 'backgrounds'));
  const fresh = Array.from({ length: 6 }, (_, i) => generateBackground(7, i));
  const windows = sampleUniformNegatives(new BackgroundWindows(fresh, side, side), 3000, seedrandom('bench-accuracy-demo')).negatives;
  const truth = await loadAnnotations(join(ROOT, 'demo-patches', 'scenes', 'truth.jsonl'));
  const scenes = await Promise.all(truth.map(async (entry) => ({ image: await decodeGrayImageFile(entry.image), truth: entry.boxes })));
  return {
    name: 'demo rivets',
    side,
    positives: positives.slice(0, 1000),
    backgrounds: await Promise.all(backgroundFiles.map((file) => decodeGrayImageFile(file))),
    patches: undefined,
    testPositives: positives.slice(1000),
    testNegatives: windows,
    scenes,
    scan: { scaleStep: 1.25, shift: 1 },
    merge: { method: 'mean', overlap: 0.5, minSupport: 3 },
    settings: { stageDetectionRate: 0.995, stageFalsePositiveRate: 0.4, targetFalsePositiveRate: 5e-5, maxStages: 8, maxWeakClassifiers: 60, negativesPerStage: 800, validationShare: 0.2, seed: 1, memoryBytes: 2 * 1024 ** 3 },
  };
}

function measure(task, stages) {
  const model = { window: { width: task.side, height: task.side }, stages };
  const detector = detectorCascadeFromModel(model);
  const tables = { rotated: cascadeUsesTiltedFeatures(detector) };
  const patches = evaluatePatches(detector, packWindowSamples(task.testPositives, task.side, task.side, undefined, tables), packWindowSamples(task.testNegatives, task.side, task.side, undefined, tables));
  let ap;
  if (task.scenes !== undefined) {
    ap = evaluateDetections(task.scenes.map(({ image, truth }) => {
      const { hits } = scanImage(detector, computeIntegralImage(image, tables), task.scan);
      return { detections: mergeDetections(hits, task.merge), truth };
    }), 0.5).averagePrecision;
  }
  return { area: patches.roc.area, at1: truePositiveRateAt(patches.roc, 0.01), kept: patches.detectionRate, accepted: patches.falsePositiveRate, ap };
}

export async function run(flags) {
  // --tasks=shirt,faces,demo and --variants=baseline,patches,augment,mirror,extended pick a subset (seeded: rows reproduce alone).
  const only = flags.find((f) => f.startsWith('--tasks='))?.slice('--tasks='.length).split(',');
  const variants = flags.find((f) => f.startsWith('--variants='))?.slice('--variants='.length).split(',');
  const builders = { shirt: fashionShirtTask, faces: facesTask, demo: demoTask };
  const pool = await createBoostingPool(2);
  const rows = [];
  const started = performance.now();
  try {
    for (const [key, build] of Object.entries(builders)) {
      if (only !== undefined && !only.includes(key)) continue;
      const task = await build();
      for (const variant of VARIANTS) {
        const extra = variant.extra(task);
        if (extra === undefined || (variants !== undefined && !variants.includes(variant.key))) continue;
        const start = performance.now();
        const result = await trainCascade({
          windowWidth: task.side, windowHeight: task.side, positives: task.positives, backgrounds: task.backgrounds,
          // Every run trains past a stage that stalls at maxWeakClassifiers (train --keep-going), so
          // that options which make stages harder (confuser patches) are not cut short by the stop rule.
          booster: 'gentle', mirror: false, stopWhenStalled: false, ...task.settings, ...extra, pool,
        });
        const seconds = (performance.now() - start) / 1000;
        const figures = measure(task, result.stages);
        const row = { task: task.name, variant: variant.name, stages: result.stages.length, weak: result.stages.reduce((n, s) => n + s.weakClassifiers.length, 0), seconds, ...figures };
        rows.push(row);
        console.log(
          `  ${row.task} | ${row.variant}: ROC area ${row.area.toFixed(4)}, detection at 1% FP ${row.at1.toFixed(3)}, ` +
            `scene AP ${row.ap === undefined ? '—' : row.ap.toFixed(3)} (${row.stages} stages, ${row.weak} weak, ${seconds.toFixed(0)} s training)`,
        );
      }
    }
  } finally {
    await pool.close();
  }
  console.log('\n| task | option | patch ROC area | detection at 1% FP | cascade: kept / accepted | scene AP | stages (weak) |');
  console.log('|---|---|---|---|---|---|---|');
  for (const r of rows) {
    console.log(`| ${r.task} | ${r.variant} | ${r.area.toFixed(3)} | ${r.at1.toFixed(3)} | ${r.kept.toFixed(3)} / ${r.accepted.toFixed(3)} | ${r.ap === undefined ? '—' : r.ap.toFixed(3)} | ${r.stages} (${r.weak}) |`);
  }
  console.log(`\n${rows.length} trainings in ${((performance.now() - started) / 60000).toFixed(1)} min`);
}
