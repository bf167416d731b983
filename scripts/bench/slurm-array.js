// Throughput of the Slurm job-array recipe on this machine (needs root and Debian's
// slurm-wlm and munge; run with `npm run bench -- slurm-array --slurm`).
//
// Images: 400 JPEG files (quality 90) of 640×480 — scikit-image's motorcycle_left.png
// centre-cropped (reference-data/photos) and the eight demo scenes resized, cycled —
// listed in one image list; the trained 8-stage demo cascade
// (test/fixtures/demo-cascade.json), default scan options (scale step 1.25, shift 1,
// nms). First one process with one scan thread over the list, then a 2-task array of
// 1 CPU each (scripts/slurm/submit-detect.sh) on a one-node cluster started by
// scripts/slurm/local-cluster.sh. Per-task figures come from each shard's done marker
// (decoding, scan and merging, from the first image to the last); the array's wall
// time runs from sbatch to the last task's end and so includes scheduling and start-up.
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { cropGrayImage, resizeGrayImage } from '../../dist/image/gray-image.js';
import { decodeGrayImageFile } from '../../dist/io/decode-image.js';

export const title = 'Slurm job array: detection throughput per task, 640×480 JPEG images';
export const onlyWith = '--slurm';

const ROOT = new URL('../../', import.meta.url).pathname;
const MODEL = join(ROOT, 'test/fixtures/demo-cascade.json');
const IMAGES = 400;
const TASKS = 2;

async function writeImages(folder) {
  mkdirSync(folder, { recursive: true });
  const sources = [];
  const photo = await decodeGrayImageFile(join(ROOT, 'reference-data/photos/motorcycle_left.png'));
  sources.push(cropGrayImage(photo, Math.floor((photo.width - 640) / 2), Math.floor((photo.height - 480) / 2), 640, 480));
  for (let k = 1; k <= 8; k++) sources.push(resizeGrayImage(await decodeGrayImageFile(join(ROOT, `demo-patches/scenes/p0${k}.png`)), 640, 480));
  const encoded = await Promise.all(sources.map((s) => sharp(Buffer.from(s.data), { raw: { width: s.width, height: s.height, channels: 1 } }).jpeg({ quality: 90 }).toBuffer()));
  const paths = [];
  for (let k = 0; k < IMAGES; k++) {
    const path = join(folder, `image-${String(k).padStart(4, '0')}.jpg`);
    writeFileSync(path, encoded[k % encoded.length]);
    paths.push(path);
  }
  const list = join(folder, 'images.txt');
  writeFileSync(list, `${paths.join('\n')}\n`);
  return list;
}

function present() {
  const missing = ['munged', 'slurmctld', 'slurmd', 'sbatch'].filter((p) => spawnSync('sh', ['-c', `command -v ${p}`]).status !== 0);
  if (missing.length > 0) return `${missing.join(', ')} not found (apt-get install -y slurm-wlm munge)`;
  return process.getuid?.() === 0 ? '' : 'needs root';
}

export async function run() {
  const absent = present();
  if (absent !== '') {
    console.log(`skipped: ${absent}`);
    return;
  }
  const folder = mkdtempSync(join(tmpdir(), 'rectboost-bench-slurm-'));
  const list = await writeImages(join(folder, 'images'));
  const bin = join(ROOT, 'bin/rectboost.js');
  const load = readFileSync('/proc/loadavg', 'utf8').split(' ').slice(0, 3).join(' ');
  console.log(`${IMAGES} images, model ${MODEL}; load average before: ${load}`);

  const single = spawnSync(process.execPath, [bin, 'detect', MODEL, '--list', list, '--no-timing', '--out', join(folder, 'single.jsonl'), '--workers', '1'], { encoding: 'utf8' });
  console.log(`one process, 1 scan thread:  ${single.stderr.trim().split('\n').pop()}`);

  const cluster = join(folder, 'cluster');
  const env = { ...process.env, SLURM_CONF: join(cluster, 'slurm.conf') };
  execFileSync('bash', [join(ROOT, 'scripts/slurm/local-cluster.sh'), 'start', cluster], { stdio: ['ignore', 'ignore', 'inherit'] });
  try {
    const out = join(folder, 'out');
    const started = performance.now();
    const submitted = execFileSync('bash', [join(ROOT, 'scripts/slurm/submit-detect.sh'), '--tasks', String(TASKS), '--cpus', '1', list, MODEL, out], { env, encoding: 'utf8' });
    const job = /Submitted job array (\d+)/.exec(submitted)[1];
    while (execFileSync('squeue', ['--noheader', '--jobs', job, '--format=%i'], { env, encoding: 'utf8' }).trim() !== '') await new Promise((r) => setTimeout(r, 100));
    const wall = (performance.now() - started) / 1000;
    let images = 0;
    for (let k = 0; k < TASKS; k++) {
      const marker = JSON.parse(readFileSync(join(out, 'shards', `shard-${k}-of-${TASKS}.done.json`), 'utf8'));
      images += marker.images;
      console.log(
        `array task ${k} (1 CPU):        ${marker.images} images in ${marker.seconds.toFixed(1)} s: ${(marker.images / marker.seconds).toFixed(1)} images/s, ` +
          `${(marker.windowsScanned / marker.seconds / 1e6).toFixed(2)} M windows/s, ${(marker.detections / marker.seconds).toFixed(1)} detections/s`,
      );
    }
    execFileSync(process.execPath, [bin, 'join', join(out, 'shards'), '--out', join(out, 'detections.jsonl')], { stdio: 'ignore' });
    const same = readFileSync(join(out, 'detections.jsonl')).equals(readFileSync(join(folder, 'single.jsonl')));
    console.log(`array of ${TASKS} on 2 cores:      ${images} images in ${wall.toFixed(1)} s wall from sbatch to the last task's end: ${(images / wall).toFixed(1)} images/s; joined output ${same ? 'equals' : 'DIFFERS FROM'} the single process byte for byte`);
  } finally {
    execFileSync('bash', [join(ROOT, 'scripts/slurm/local-cluster.sh'), 'stop', cluster], { stdio: 'inherit' });
    rmSync(folder, { recursive: true, force: true });
  }
}
