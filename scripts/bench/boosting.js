// Boosting engine speed: response-matrix build and weak-learner search over the
// 162,336 basic features of a 24×24 window and 10,000 seeded random samples
// (5,000 positives, 5,000 negatives), in a worker pool of every core.
// Options: --samples=N (default 10000), --workers=N (default: all cores), --rounds=N (default 5).
// Wall-clock rates depend on what else the machine runs, so each figure is also given
// per CPU-second: process CPU time (all threads, from process.cpuUsage) over the same
// span, which stays comparable on a busy machine. The load average is printed first.
import os from 'node:os';
import seedrandom from 'seedrandom';
import { trainStage } from '../../dist/boost/train-stage.js';
import { enumerateFeatures } from '../../dist/features/enumerate-features.js';
import { packWindowSamples } from '../../dist/features/window-samples.js';
import { createBoostingPool } from '../../dist/parallel/boosting-pool.js';

export const title = 'Boosting engine: response matrix and weak-learner search';

function option(flags, name, fallback) {
  const flag = flags.find((f) => f.startsWith(`--${name}=`));
  return flag === undefined ? fallback : Number(flag.split('=')[1]);
}

function cpuSeconds() {
  const { user, system } = process.cpuUsage();
  return (user + system) / 1e6;
}

function randomWindows(count, random) {
  return Array.from({ length: count }, () => {
    const data = new Uint8Array(24 * 24);
    for (let i = 0; i < data.length; i++) data[i] = Math.floor(random() * 256);
    return { width: 24, height: 24, data };
  });
}

export async function run(flags) {
  const sampleCount = option(flags, 'samples', 10_000);
  const workers = option(flags, 'workers', os.availableParallelism());
  const rounds = option(flags, 'rounds', 5);
  const random = seedrandom('bench-boosting');
  const positives = packWindowSamples(randomWindows(sampleCount / 2, random), 24, 24);
  const negatives = packWindowSamples(randomWindows(sampleCount / 2, random), 24, 24);
  const features = enumerateFeatures(24, 24);
  const pool = await createBoostingPool(workers);
  try {
    console.log(`load average before: ${os.loadavg().map((l) => l.toFixed(2)).join(', ')} on ${os.availableParallelism()} cores`);
    const roundTimes = [];
    const roundCpuSeconds = [];
    let matrixCpuSeconds = 0;
    let lastCpu = cpuSeconds();
    // Random windows never meet a false-positive target of 1e-9, so every round runs.
    const result = await trainStage({
      features, positives, negatives, validationPositives: positives, booster: 'discrete',
      minDetectionRate: 0.995, maxFalsePositiveRate: 1e-9, maxWeakClassifiers: rounds, pool,
      random: seedrandom('bench-subset'),
      onRound: (round) => {
        // The first report also covers packing and the matrix build; the mean CPU time of
        // the later rounds is subtracted from it below to estimate the build alone.
        const now = cpuSeconds();
        roundTimes.push(round.milliseconds);
        roundCpuSeconds.push(now - lastCpu);
        lastCpu = now;
      },
    });
    const cells = features.length * sampleCount;
    const secondsPerRound = roundTimes.reduce((a, b) => a + b, 0) / roundTimes.length / 1000;
    // Rounds after the first have clean CPU spans; the first one includes the matrix build.
    const laterCpu = roundCpuSeconds.slice(1);
    const cpuPerRound = laterCpu.length > 0 ? laterCpu.reduce((a, b) => a + b, 0) / laterCpu.length : NaN;
    matrixCpuSeconds = roundCpuSeconds[0] - (Number.isNaN(cpuPerRound) ? 0 : cpuPerRound);
    console.log(`${features.length.toLocaleString('en-US')} features × ${sampleCount.toLocaleString('en-US')} samples, ${workers} worker(s)`);
    console.log(`matrix build: ${result.matrixSeconds.toFixed(2)} s (${(cells / result.matrixSeconds / 1e6).toFixed(0)} million responses/s total, ${(cells / result.matrixSeconds / 1e6 / workers).toFixed(0)} per core)`);
    console.log(`boosting round: ${(secondsPerRound * 1000).toFixed(0)} ms mean over ${roundTimes.length} rounds (min ${Math.min(...roundTimes).toFixed(0)} ms, max ${Math.max(...roundTimes).toFixed(0)} ms)`);
    console.log(`weak-learner search: ${(cells / secondsPerRound / 1e6).toFixed(0)} million cells/s total, ${(cells / secondsPerRound / 1e6 / workers).toFixed(0)} million cells/s per core`);
    console.log(`CPU time: matrix build ≈ ${matrixCpuSeconds.toFixed(1)} CPU-s (${(cells / matrixCpuSeconds / 1e6).toFixed(0)} million responses per CPU-second), round ${(cpuPerRound * 1000).toFixed(0)} CPU-ms (${(cells / cpuPerRound / 1e6).toFixed(0)} million cells per CPU-second)`);
    console.log(`load average after: ${os.loadavg().map((l) => l.toFixed(2)).join(', ')}`);
    console.log(`peak memory (maxRSS): ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MiB`);
  } finally {
    await pool.close();
  }
}
