// Detection speed on one core with a trained cascade: test/fixtures/demo-cascade.json
// (8 stages, made by `rectboost train` on demo-patches; see that file's "training"
// block for the options) on 640×480 images, scale step 1.25, shift 1.
//
// Images: scikit-image's motorcycle_left.png from reference-data/photos,
// centre-cropped to 640×480 (a natural photo the cascade never saw), and the
// demo scenes demo-patches/scenes/p01..p08 resized to 640×480 (the kind of
// background the cascade was trained on).
//
// Figures per image: integral image time, scan time (integral image excluded,
// after three warm-up scans; best and median of 3 passes × 10 runs, wall clock
// and the process's CPU time), windows/s, mean weak classifiers evaluated per window, and where
// windows were rejected. The scan runs in a WebAssembly kernel that V8 first
// compiles quickly and then optimizes in the background; the very first scan
// of the process, printed apart, shows that start-up cost.
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { detectorCascadeFromModel } from '../../dist/detect/detector-cascade.js';
import { mergeDetections } from '../../dist/detect/merge-detections.js';
import { scanImage } from '../../dist/detect/scan-image.js';
import { cropGrayImage, resizeGrayImage } from '../../dist/image/gray-image.js';
import { computeIntegralImage } from '../../dist/image/integral-image.js';
import { decodeGrayImageFile } from '../../dist/io/decode-image.js';

export const title = 'Multiscale detection, one core, 640×480 images, trained 8-stage cascade';

const MODEL = new URL('../../test/fixtures/demo-cascade.json', import.meta.url);
const PHOTO = new URL('../../reference-data/photos/motorcycle_left.png', import.meta.url).pathname;
const SCENES = new URL('../../demo-patches/scenes/', import.meta.url).pathname;
const WIDTH = 640;
const HEIGHT = 480;
const SCAN = { scaleStep: 1.25, shift: 1 };
const PASSES = 3;
const REPEATS = 10;

async function loadImages() {
  const images = [];
  if (existsSync(PHOTO)) {
    const photo = await decodeGrayImageFile(PHOTO);
    images.push({ name: 'motorcycle_left.png (centre crop)', image: cropGrayImage(photo, Math.floor((photo.width - WIDTH) / 2), Math.floor((photo.height - HEIGHT) / 2), WIDTH, HEIGHT) });
  } else {
    console.log(`note: ${PHOTO} is missing (run scripts/fetch-reference-data.sh); photo skipped`);
  }
  if (existsSync(SCENES)) {
    for (const file of readdirSync(SCENES).filter((f) => f.endsWith('.png')).sort()) {
      images.push({ name: `demo scene ${file} (resized)`, image: resizeGrayImage(await decodeGrayImageFile(SCENES + file), WIDTH, HEIGHT) });
    }
  }
  return images;
}

/** Milliseconds of wall clock and of this process's CPU time for one call of `work`. */
function timed(work) {
  const wallStart = performance.now();
  const cpuStart = process.cpuUsage();
  const result = work();
  const cpu = process.cpuUsage(cpuStart);
  return { result, wall: performance.now() - wallStart, cpu: (cpu.user + cpu.system) / 1000 };
}

function median(values) {
  const sorted = [...values].sort((x, y) => x - y);
  const middle = sorted.length >> 1;
  return sorted.length % 2 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

export async function run() {
  const model = JSON.parse(readFileSync(MODEL, 'utf8'));
  const cascade = detectorCascadeFromModel(model);
  const images = await loadImages();
  console.log(`cascade: ${cascade.stages.length} stages of ${cascade.stages.map((s) => s.weakClassifiers.length).join(', ')} weak classifiers (${MODEL.pathname.split('/').slice(-3).join('/')})`);
  console.log(`scan: ${WIDTH}×${HEIGHT}, scale step ${SCAN.scaleStep}, shift ${SCAN.shift}; ${PASSES} passes over the images, ${REPEATS} runs of each per pass`);
  console.log('times: best (the code\'s speed; other load only adds time) and median of all runs; wall clock / CPU time of this process');
  if (images.length === 0) return;
  const first = timed(() => scanImage(cascade, computeIntegralImage(images[0].image), SCAN));
  console.log(`first scan of the process (kernel compile and warm-up included, integral image too): ${first.wall.toFixed(1)} ms`);
  const measured = images.map(({ image }) => {
    const integral = computeIntegralImage(image);
    for (let i = 0; i < 3; i++) scanImage(cascade, integral, SCAN); // warm-up: V8 optimizes the kernel after its first calls
    return { integral, tableWall: [], tableCpu: [], scanWall: [], scanCpu: [], result: undefined };
  });
  // Passes spread each image's runs over the whole measurement, so a slow spell of the machine does not hit one image only.
  for (let pass = 0; pass < PASSES; pass++) {
    images.forEach(({ image }, k) => {
      const m = measured[k];
      for (let i = 0; i < REPEATS; i++) {
        const table = timed(() => computeIntegralImage(image));
        m.tableWall.push(table.wall);
        m.tableCpu.push(table.cpu);
        const scan = timed(() => scanImage(cascade, m.integral, SCAN));
        m.scanWall.push(scan.wall);
        m.scanCpu.push(scan.cpu);
        m.result = scan.result;
      }
    });
  }
  const totals = { windows: 0, features: 0, bestWall: 0, bestCpu: 0, medianWall: 0 };
  images.forEach(({ name }, k) => {
    const m = measured[k];
    const { statistics, hits } = m.result;
    const detections = mergeDetections(hits, { method: 'nms', overlap: 0.3 });
    const windows = statistics.windowsScanned;
    const bestWall = Math.min(...m.scanWall);
    const bestCpu = Math.min(...m.scanCpu);
    const medianWall = median(m.scanWall);
    totals.windows += windows;
    totals.features += statistics.featuresEvaluated;
    totals.bestWall += bestWall;
    totals.bestCpu += bestCpu;
    totals.medianWall += medianWall;
    console.log(`${name}`);
    console.log(`  integral image (sum + squared): best ${Math.min(...m.tableWall).toFixed(2)} / ${Math.min(...m.tableCpu).toFixed(2)} ms, median ${median(m.tableWall).toFixed(2)} ms`);
    console.log(`  scan (${statistics.scales} scales, ${windows.toLocaleString('en-US')} windows): best ${bestWall.toFixed(1)} / ${bestCpu.toFixed(1)} ms = ${(windows / bestWall / 1e3).toFixed(1)} / ${(windows / bestCpu / 1e3).toFixed(1)} million windows/s on one core; median ${medianWall.toFixed(1)} ms = ${(windows / medianWall / 1e3).toFixed(1)} M/s`);
    console.log(`  mean weak classifiers per window ${(statistics.featuresEvaluated / windows).toFixed(2)}; rejected by stage ${statistics.rejectedAtStage.join(', ')}; flat ${statistics.flatWindows}; accepted ${statistics.accepted} (${detections.length} after nms)`);
  });
  if (images.length > 1) {
    console.log(`all ${images.length} images: best ${(totals.windows / totals.bestWall / 1e3).toFixed(1)} / ${(totals.windows / totals.bestCpu / 1e3).toFixed(1)} million windows/s (wall / CPU), median ${(totals.windows / totals.medianWall / 1e3).toFixed(1)} M/s; ${(totals.features / totals.windows).toFixed(2)} weak classifiers per window`);
  }
}
