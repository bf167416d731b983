// Negative-mining throughput: the 8-stage demo cascade (test/fixtures/demo-cascade.json, trained on
// demo-patches/) mines every background window of the 20 demo backgrounds at every pyramid level
// until they run out (wanted = all windows), so each window is looked at once. Figures are windows
// per second of kernel evaluation on the one thread that mines (per core), and of the whole call.
// Options: --runs=N (default 3).
import os from 'node:os';
import seedrandom from 'seedrandom';
import { BackgroundWindows, mineHardNegatives } from '../../dist/cascade/negative-mining.js';
import { loadBackgroundImages } from '../../dist/data/backgrounds.js';
import { loadModelFile } from '../../dist/io/model-file.js';

export const title = 'Negative mining through the scan kernel (demo backgrounds, 8-stage demo cascade)';

function option(flags, name, fallback) {
  const flag = flags.find((f) => f.startsWith(`--${name}=`));
  return flag === undefined ? fallback : Number(flag.split('=')[1]);
}

export async function run(flags) {
  const runs = option(flags, 'runs', 3);
  const root = new URL('../../', import.meta.url).pathname;
  const { model } = await loadModelFile(`${root}test/fixtures/demo-cascade.json`, { require: 'full-model' });
  const { images } = await loadBackgroundImages(`${root}demo-patches/backgrounds`, { windowWidth: 24, windowHeight: 24, skipBad: false });
  console.log(`load average before: ${os.loadavg().map((l) => l.toFixed(2)).join(', ')} on ${os.availableParallelism()} cores`);
  for (let run = 1; run <= runs; run++) {
    const backgrounds = new BackgroundWindows(images, 24, 24);
    for (let i = 0; i < backgrounds.sheets.length; i++) backgrounds.level(i); // level images built outside the timing (integral tables per sheet inside the call, outside the kernel figure)
    const started = performance.now();
    const mined = mineHardNegatives(backgrounds, model, backgrounds.totalWindows, seedrandom(`bench-mining:${run}`));
    const seconds = (performance.now() - started) / 1000;
    console.log(`run ${run}: ${mined.windowsScanned} windows (${backgrounds.sheets.length} sheets), ${mined.negatives.length} accepted; ` +
      `kernel ${(mined.windowsEvaluated / mined.evaluationSeconds / 1e6).toFixed(1)} M windows/s per core, whole call ${(mined.windowsScanned / seconds / 1e6).toFixed(1)} M windows/s (${seconds.toFixed(2)} s)`);
  }
}
