// Training at a realistic size: Fashion-MNIST items of one class as positives (28×28, so
// 299,880 basic features), mosaics of the other classes as backgrounds, the default stage
// targets. Prints wall time, time per phase (response table, boosting rounds, mining),
// peak resident memory per stage and over the run, and mining throughput.
// Options: --positives=N (default 6000), --negatives=N (default 2000), --stages=N (default 20),
// --mosaics=N (default 60; 560×560 each), --workers=N (default: all cores), --max-weak=N (default 200).
// Resident memory is sampled every 50 ms from process.memoryUsage().rss (the whole process,
// worker threads included). Needs reference-data/fashion-mnist (scripts/fetch-reference-data.sh).
import os from 'node:os';
import { trainCascade } from '../../dist/cascade/build-cascade.js';
import { loadFashionMnist } from '../../dist/data/fashion-mnist.js';
import { enumerateFeatures } from '../../dist/features/enumerate-features.js';
import { createGrayImage } from '../../dist/image/gray-image.js';
import { createBoostingPool } from '../../dist/parallel/boosting-pool.js';

export const title = 'Training at a realistic size (Fashion-MNIST, 28×28)';

/** The positive class: trouser (label 1), as in test/realdata/fashion-mnist-trouser.test.ts. */
const OBJECT_CLASS = 1;
const SIDE = 28;
/** A 560×560 mosaic holds 20 × 20 items. */
const MOSAIC_ITEMS = 20;

function option(flags, name, fallback) {
  const flag = flags.find((f) => f.startsWith(`--${name}=`));
  return flag === undefined ? fallback : Number(flag.split('=')[1]);
}

function mosaic(items) {
  const width = MOSAIC_ITEMS * SIDE;
  const image = createGrayImage(width, width);
  items.forEach((item, k) => {
    const left = (k % MOSAIC_ITEMS) * SIDE;
    const top = Math.floor(k / MOSAIC_ITEMS) * SIDE;
    for (let row = 0; row < SIDE; row++) image.data.set(item.data.subarray(row * SIDE, (row + 1) * SIDE), (top + row) * width + left);
  });
  return image;
}

const gigabytes = (bytes) => (bytes / 2 ** 30).toFixed(2);

export async function run(flags) {
  const positiveCount = option(flags, 'positives', 6000);
  const negativesPerStage = option(flags, 'negatives', 2000);
  const maxStages = option(flags, 'stages', 20);
  const mosaicCount = option(flags, 'mosaics', 60);
  const workers = option(flags, 'workers', os.availableParallelism());
  const maxWeakClassifiers = option(flags, 'max-weak', 200);
  const { images, labels } = await loadFashionMnist(new URL('../../reference-data/fashion-mnist', import.meta.url).pathname, 'train');
  const positives = [];
  const others = [];
  images.forEach((image, i) => (labels[i] === OBJECT_CLASS ? positives : others).push(image));
  positives.length = Math.min(positives.length, positiveCount);
  const perMosaic = MOSAIC_ITEMS * MOSAIC_ITEMS;
  const backgrounds = Array.from({ length: mosaicCount }, (_, m) => mosaic(others.slice(m * perMosaic, (m + 1) * perMosaic)));
  const features = enumerateFeatures(SIDE, SIDE).length;
  console.log(`load average before: ${os.loadavg().map((l) => l.toFixed(2)).join(', ')} on ${os.availableParallelism()} cores; ${workers} workers`);
  console.log(`${positives.length} positives, ${mosaicCount} mosaics of ${MOSAIC_ITEMS * SIDE}², ${negativesPerStage} negatives per stage, up to ${maxStages} stages, ${features} features`);

  let peak = process.memoryUsage().rss;
  let stagePeak = peak;
  const sampler = setInterval(() => {
    const rss = process.memoryUsage().rss;
    if (rss > peak) peak = rss;
    if (rss > stagePeak) stagePeak = rss;
  }, 50);
  const phaseSeconds = { responseTable: 0, boosting: 0, mining: 0 };
  let largestTable = 0;
  const started = performance.now();
  const pool = await createBoostingPool(workers);
  try {
    const result = await trainCascade({
      windowWidth: SIDE, windowHeight: SIDE, positives, backgrounds,
      stageDetectionRate: 0.995, stageFalsePositiveRate: 0.5, targetFalsePositiveRate: 1e-5,
      maxStages, maxWeakClassifiers, negativesPerStage, booster: 'gentle', mirror: false,
      validationShare: 0.2, seed: 1, memoryBytes: 2 ** 32, pool,
      onEvent: (event) => {
        if (event.phase === 'responses') largestTable = Math.max(largestTable, event.features * event.samples);
        if (event.phase === 'stage-finished') {
          const r = event.report;
          for (const key of Object.keys(phaseSeconds)) phaseSeconds[key] += r.phaseSeconds?.[key] ?? 0;
          const rate = r.miningWindowsPerSecond === undefined ? '' : `, mining ${(r.miningWindowsPerSecond / 1e6).toFixed(1)} M windows/s`;
          console.log(`stage ${r.stageIndex + 1}: ${r.weakClassifiers} weak, f.p. ${r.falsePositiveRate.toFixed(4)}, ${r.windowsScanned} windows scanned${rate}, ` +
            `${r.seconds.toFixed(1)} s, peak RSS in stage ${gigabytes(stagePeak)} GB`);
          stagePeak = process.memoryUsage().rss;
        }
      },
    });
    console.log(`${result.stages.length} stages (${result.stopReason}) in ${((performance.now() - started) / 1000).toFixed(1)} s wall`);
  } finally {
    clearInterval(sampler);
    await pool.close();
  }
  console.log(`time per phase: response tables ${phaseSeconds.responseTable.toFixed(1)} s, boosting rounds ${phaseSeconds.boosting.toFixed(1)} s, mining ${phaseSeconds.mining.toFixed(1)} s`);
  console.log(`peak RSS ${gigabytes(peak)} GB; largest table ${gigabytes(largestTable)} GB; bound 1.3 × table + 0.6 GB = ${gigabytes(1.3 * largestTable + 0.6 * 2 ** 30)} GB`);
}
