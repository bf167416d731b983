// Runtimes side by side, one core each, in one run: the WebAssembly kernel (what
// `rectboost detect` and rectboost/runtime use), the runtime's plain-JS scan, and the
// C99 export (rectboost export --c) compiled with `cc -O2` as the float build and as
// the integer build. Same cascade (test/fixtures/demo-cascade.json), same images,
// same options (scale step 1.25, shift 1, nms at 0.3).
//
// Images: the eight demo panels (480×360) and scikit-image's motorcycle_left.png
// (reference-data/photos, 640×501), as the CLI decodes them; the C programs read them as PGM.
// Each figure times integral image + scan + merge per image, the best of REPEATS
// runs (JS: wall clock per run after warm-up; C: the example program's --repeat, CPU time
// by clock()). Windows/s = windows scanned / that time; the integer build scans
// slightly fewer windows (none above 66,051 pixels), and its own count is used.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { detectorCascadeFromModel } from '../../dist/detect/detector-cascade.js';
import { mergeDetections } from '../../dist/detect/merge-detections.js';
import { scanImage } from '../../dist/detect/scan-image.js';
import { computeIntegralImage } from '../../dist/image/integral-image.js';
import { decodeGrayImageFile } from '../../dist/io/decode-image.js';
import { scanImagePlain } from '../../dist/runtime/index.js';
import { compileC, compilerVersion, exportC, writePgm } from '../c-detector/build.js';

export const title = 'Runtimes side by side: WebAssembly kernel, plain JS, C float build, C integer build (one core each)';

const MODEL = fileURLToPath(new URL('../../test/fixtures/demo-cascade.json', import.meta.url));
const SCENES = fileURLToPath(new URL('../../demo-patches/scenes/', import.meta.url));
const PHOTO = fileURLToPath(new URL('../../reference-data/photos/motorcycle_left.png', import.meta.url));
const REPEATS = 5;

function best(work) {
  let fastest = Infinity;
  let result;
  for (let i = 0; i < REPEATS; i++) {
    const start = performance.now();
    result = work();
    fastest = Math.min(fastest, performance.now() - start);
  }
  return { milliseconds: fastest, result };
}

export async function run() {
  const version = compilerVersion();
  const cascade = detectorCascadeFromModel(JSON.parse((await import('node:fs')).readFileSync(MODEL, 'utf8')));
  const files = readdirSync(SCENES).filter((f) => f.endsWith('.png')).sort().map((f) => SCENES + f);
  if (existsSync(PHOTO)) files.push(PHOTO);
  else console.log(`note: ${PHOTO} is missing (run scripts/fetch-reference-data.sh); photo skipped`);
  const dir = mkdtempSync(join(tmpdir(), 'rectboost-bench-c-'));
  try {
    const images = [];
    for (const file of files) {
      const image = await decodeGrayImageFile(file);
      const pgm = join(dir, `${images.length}.pgm`);
      writePgm(pgm, image);
      images.push({ name: file.split('/').pop(), image, pgm });
    }
    const engines = [
      { name: 'WebAssembly kernel', scan: scanImage },
      { name: 'plain JS (runtime fallback)', scan: scanImagePlain },
    ];
    const rows = [];
    for (const engine of engines) {
      let windows = 0;
      let milliseconds = 0;
      for (const { image } of images) {
        engine.scan(cascade, computeIntegralImage(image), {}); // warm-up
        const timed = best(() => {
          const scanned = engine.scan(cascade, computeIntegralImage(image), {});
          mergeDetections(scanned.hits, {});
          return scanned.statistics.windowsScanned;
        });
        windows += timed.result;
        milliseconds += timed.milliseconds;
      }
      rows.push({ name: engine.name, windows, milliseconds });
    }
    if (version === undefined) {
      console.log('note: no `cc` on PATH (apt-get install -y gcc); C builds skipped');
    } else {
      exportC(MODEL, dir);
      for (const build of ['float', 'integer']) {
        const program = compileC(dir, `detect-${build}`, build, ['-O2']);
        const result = spawnSync(program, ['--repeat', String(REPEATS), ...images.map((i) => i.pgm)], { encoding: 'utf8', maxBuffer: 1 << 28 });
        if (result.status !== 0) throw new Error(result.stderr);
        let windows = 0;
        let milliseconds = 0;
        for (const line of result.stdout.trim().split('\n')) {
          const parsed = JSON.parse(line);
          windows += parsed.windowsScanned;
          milliseconds += parsed.milliseconds;
        }
        rows.push({ name: `C ${build} build (cc -O2${build === 'float' ? ' -ffp-contract=off' : ' -DRBD_INTEGER'}; mean of ${REPEATS} runs)`, windows, milliseconds });
      }
    }
    console.log(`cascade: ${cascade.stages.length} stages, ${cascade.stages.reduce((n, s) => n + s.weakClassifiers.length, 0)} weak classifiers; ${images.length} images (${images.map((i) => i.name).join(', ')})`);
    console.log(`compiler: ${version ?? 'none'}; node ${process.version}`);
    console.log('runtime                                                     windows     ms (all images)   million windows/s');
    for (const row of rows) {
      console.log(`${row.name.padEnd(58)}  ${String(row.windows).padStart(9)}  ${row.milliseconds.toFixed(1).padStart(16)}  ${(row.windows / row.milliseconds / 1e3).toFixed(2).padStart(18)}`);
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
