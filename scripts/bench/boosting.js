// Boosting engine speed: response-matrix build and weak-learner search over the
// 162,336 basic features of a 24×24 window and 10,000 seeded random samples
// (5,000 positives, 5,000 negatives), in a worker pool of every core.
// Options: --samples=N (default 10000), --workers=N (default: all cores), --rounds=N (default 5).
import os from 'node:os';
import seedrandom from 'seedrandom';
import { createBoostingPool, enumerateFeatures, packWindowSamples, trainStage } from '../../dist/index.js';

export const title = 'Boosting engine: response matrix and weak-learner search';

function option(flags, name, fallback) {
  const flag = flags.find((f) => f.startsWith(`--${name}=`));
  return flag === undefined ? fallback : Number(flag.split('=')[1]);
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
    const roundTimes = [];
    // Random windows never meet a false-positive target of 1e-9, so every round runs.
    const result = await trainStage({
      features, positives, negatives, validationPositives: positives, booster: 'discrete',
      minDetectionRate: 0.995, maxFalsePositiveRate: 1e-9, maxWeakClassifiers: rounds, pool,
      random: seedrandom('bench-subset'), onRound: (round) => roundTimes.push(round.milliseconds),
    });
    const cells = features.length * sampleCount;
    const secondsPerRound = roundTimes.reduce((a, b) => a + b, 0) / roundTimes.length / 1000;
    console.log(`${features.length.toLocaleString('en-US')} features × ${sampleCount.toLocaleString('en-US')} samples, ${workers} worker(s)`);
    console.log(`matrix build: ${result.matrixSeconds.toFixed(2)} s (${(cells / result.matrixSeconds / 1e6).toFixed(0)} million responses/s total, ${(cells / result.matrixSeconds / 1e6 / workers).toFixed(0)} per core)`);
    console.log(`boosting round: ${(secondsPerRound * 1000).toFixed(0)} ms mean over ${roundTimes.length} rounds (min ${Math.min(...roundTimes).toFixed(0)} ms, max ${Math.max(...roundTimes).toFixed(0)} ms)`);
    console.log(`weak-learner search: ${(cells / secondsPerRound / 1e6).toFixed(0)} million cells/s total, ${(cells / secondsPerRound / 1e6 / workers).toFixed(0)} million cells/s per core`);
    console.log(`peak memory (maxRSS): ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MiB`);
  } finally {
    await pool.close();
  }
}
