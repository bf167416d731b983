// Side-by-side benchmark against reference libraries (issue 7): runs only with
// `npm run bench -- --peers` (or `npm run bench -- peers --peers` for this section alone).
// The peer logic lives in scripts/peers/; the Python half runs with Debian's python3.
// Options: --peer-patches=N (even, ≤ 200; default 100) patches for (a),
// --peer-samples=N (default 1000) samples for (b), --peer-rounds=N (default 5) rounds
// timed in (b), --peer-accuracy-rounds=1,5,10,20 for (c), --peer-processes=N (default:
// all cores) for scikit-image's process pool, --peer-layouts=C,F for scikit-learn's input,
// --workers=N (default: all cores) for rectboost.
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import { join } from 'node:path';
import { createBoostingPool } from '../../dist/parallel/boosting-pool.js';
import { renderTable } from '../../dist/cli/text-table.js';
import { compareAccuracy } from '../peers/compare-accuracy.js';
import { compareBoostingRound } from '../peers/compare-boosting-round.js';
import { compareFeatures } from '../peers/compare-features.js';
import { describeMachine, loadAverage } from '../peers/machine.js';
import { PYTHON, findPythonPeer } from '../peers/python-peer.js';

export const title = 'Side by side with scikit-image and scikit-learn (same machine, same run, same data)';
export const onlyWith = '--peers';

function option(flags, name, fallback) {
  const flag = flags.find((f) => f.startsWith(`--${name}=`));
  return flag === undefined ? fallback : flag.slice(name.length + 3);
}

const grouped = (n) => n.toLocaleString('en-US');
const seconds = (s) => (s >= 10 ? `${s.toFixed(1)} s` : s >= 1 ? `${s.toFixed(2)} s` : `${(s * 1000).toFixed(s >= 0.1 ? 0 : 1)} ms`);
const ratio = (peer, ours) => `${(peer / ours).toFixed(peer / ours >= 100 ? 0 : 1)}×`;
const percent = (x) => `${(100 * x).toFixed(1)} %`;

export async function run(flags) {
  const patchCount = Number(option(flags, 'peer-patches', '100'));
  const sampleCount = Number(option(flags, 'peer-samples', '1000'));
  const timedRounds = Number(option(flags, 'peer-rounds', '5'));
  const roundCounts = option(flags, 'peer-accuracy-rounds', '1,5,10,20').split(',').map(Number).sort((a, b) => a - b);
  const peerProcesses = Number(option(flags, 'peer-processes', String(os.availableParallelism())));
  const layouts = option(flags, 'peer-layouts', 'C,F');
  const workers = Number(option(flags, 'workers', String(os.availableParallelism())));
  if (!(patchCount >= 2 && patchCount <= 200 && patchCount % 2 === 0)) throw new Error(`--peer-patches must be an even number from 2 to 200; received ${patchCount}.`);

  const machine = describeMachine();
  const loadBefore = loadAverage();
  const peers = await findPythonPeer();
  for (const [name, reason] of [['scikit-image', peers.skimage], ['scikit-learn', peers.sklearn]]) {
    if (reason !== null) console.log(`skipping ${name}: ${reason}`);
  }
  const scratchFolder = mkdtempSync(join(os.tmpdir(), 'rectboost-peers-'));
  const pool = await createBoostingPool(workers);
  let features;
  let round;
  let accuracy;
  try {
    console.error(`(a) feature values on ${patchCount} patches…`);
    features = await compareFeatures({ pool, patchCount, scratchFolder, skimageSkip: peers.skimage, peerProcesses });
    console.error(`(b) boosting rounds on ${sampleCount} samples…`);
    round = await compareBoostingRound({ pool, sampleCount, rounds: timedRounds, scratchFolder, sklearnSkip: peers.sklearn, layouts });
    rmSync(join(scratchFolder, 'round-matrix.npy'), { force: true });
    console.error(`(c) accuracy on the lfw_subset split after ${roundCounts.join(', ')} rounds…`);
    accuracy = await compareAccuracy({ roundCounts, scratchFolder, sklearnSkip: peers.sklearn });
  } finally {
    await pool.close();
    rmSync(scratchFolder, { recursive: true, force: true });
  }

  const loadAfter = loadAverage();
  const v = peers.versions;
  console.log(`machine: ${machine.cpuModel}${machine.megahertz ? ` (${machine.megahertz.toFixed(0)} MHz)` : ''}, ${machine.logicalCores} logical cores, ${machine.memoryGiB.toFixed(1)} GiB, ${machine.platform}`);
  console.log(`software: Node ${machine.node}` + (v ? `; ${PYTHON}: Python ${v.python}, numpy ${v.numpy}, scikit-image ${v['scikit-image'] ?? 'absent'}, scikit-learn ${v['scikit-learn'] ?? 'absent'}` +
    (v.threadpools.length > 0 ? `; BLAS/OpenMP pools: ${v.threadpools.map((p) => `${p.api} ${p.threads} threads`).join(', ')}` : '') : ''));
  console.log(`load: 1-minute load average ${loadBefore.toFixed(2)} before, ${loadAfter.toFixed(2)} after, on ${machine.logicalCores} cores${Math.max(loadBefore, loadAfter) > machine.logicalCores * 0.75 ? ' — other work was competing for the cores; figures are pessimistic for both sides' : ''}`);
  console.log(`threads: rectboost ${workers} worker thread(s); scikit-image haar_like_feature and scikit-learn tree fitting are single-threaded (the pool row uses ${peerProcesses} processes)`);

  const rows = [];
  const a = features;
  const aLabel = `(a) ${grouped(a.features)} features × ${a.patches} patches`;
  if (a.peer) {
    rows.push([aLabel, `${seconds(a.rectboostSeconds)} (${a.workers} workers)`, `scikit-image ${seconds(a.peer.oneProcessSeconds)} (1 process)`, ratio(a.peer.oneProcessSeconds, a.rectboostSeconds)]);
    if (a.peer.poolSeconds !== null) rows.push(['', '', `scikit-image ${seconds(a.peer.poolSeconds)} (${a.peer.poolProcesses} processes)`, ratio(a.peer.poolSeconds, a.rectboostSeconds)]);
    rows.push(['    per patch', `${seconds(a.rectboostSeconds / a.patches)}`, `${seconds(a.peer.oneProcessSeconds / a.patches)} (1 process)`, '']);
  } else {
    rows.push([aLabel, `${seconds(a.rectboostSeconds)} (${a.workers} workers)`, 'skipped', '']);
  }
  const b = round;
  const bLabel = `(b) one AdaBoost round, ${grouped(b.features)} × ${grouped(b.samples)}`;
  const fits = b.peer?.fits ?? [];
  const fastest = fits.length > 0 ? Math.min(...fits.map((fit) => Math.min(...fit.seconds))) : null;
  rows.push([bLabel, `${seconds(b.pooledRoundMilliseconds / 1000)} (${b.workers} workers)`,
    fits[0] ? `scikit-learn ${seconds(Math.min(...fits[0].seconds))} (${fits[0].layout} order)` : 'skipped',
    fits[0] ? ratio(Math.min(...fits[0].seconds), b.pooledRoundMilliseconds / 1000) : '']);
  for (const fit of fits.slice(1)) rows.push(['', '', `scikit-learn ${seconds(Math.min(...fit.seconds))} (${fit.layout} order)`, ratio(Math.min(...fit.seconds), b.pooledRoundMilliseconds / 1000)]);
  rows.push(['', `${seconds(b.oneThreadRoundMilliseconds / 1000)} (1 thread)`, fastest !== null ? `scikit-learn ${seconds(fastest)} (fastest fit)` : '', fastest !== null ? ratio(fastest, b.oneThreadRoundMilliseconds / 1000) : '']);
  const c = accuracy;
  for (const rounds of roundCounts) {
    const ours = c.rectboost.byRounds[rounds];
    const theirs = c.peer?.byRounds[String(rounds)];
    if (ours === undefined) continue;
    rows.push([`(c) test accuracy, ${rounds} round${rounds === 1 ? '' : 's'}`, percent(ours.accuracy), theirs ? `scikit-learn ${percent(theirs.accuracy)}` : 'skipped',
      theirs ? `${((ours.accuracy - theirs.accuracy) * 100).toFixed(1)} points` : '']);
    rows.push(['    ROC area', ours.areaUnderRoc.toFixed(3), theirs ? theirs.areaUnderRoc.toFixed(3) : '', theirs ? (ours.areaUnderRoc - theirs.areaUnderRoc).toFixed(3) : '']);
  }
  console.log('');
  console.log(renderTable('rectboost vs reference libraries (ratio: reference time ÷ rectboost time; accuracy: rectboost − reference)',
    ['measure', 'rectboost', 'reference', 'ratio / difference'], rows));

  console.log('notes:');
  if (a.check) {
    console.log(`  (a) same feature set: scikit-image lists ${grouped(a.check.featureCount)} features, rectboost ${grouped(a.check.ourFeatureCount)}, ${a.check.sameSet ? 'the same rectangles' : 'NOT the same rectangles'}; ` +
      `${grouped(a.check.valuesCompared)} values compared after mapping sign and centre-weight conventions, ${a.check.differing} differ.`);
    console.log(`  (a) rectboost times integral images + variance normalization + 8-bit quantization of every value (its training matrix), median of ${a.rectboostAllSeconds.length} runs after a warm-up; scikit-image times integral_image + haar_like_feature with precomputed coordinates (building them took ${seconds(a.peer.coordinateSeconds)}, not counted).`);
  }
  console.log(`  (b) samples: ${grouped(b.positives)} lfw_subset face crops (4 offsets, mirrored) and ${grouped(b.samples - b.positives)} non-faces (lfw_subset non-face crops, then crops of the scikit-image sample photos); rectboost matrix build ${seconds(b.matrixSeconds)}.`);
  console.log(`  (b) rectboost round = split search over 8-bit bins + α + weight update, median of ${b.pooledRoundsMilliseconds.length} rounds (pool: ${b.pooledRoundsMilliseconds.map((ms) => ms.toFixed(0)).join(', ')} ms; one thread: ${b.oneThreadRoundsMilliseconds.map((ms) => ms.toFixed(0)).join(', ')} ms).`);
  if (b.peer) {
    console.log(`  (b) scikit-learn got the unquantized float32 values the bins were made from (${b.matrixCheck.checked} rows re-quantized, ${b.matrixCheck.differing} differ); it times AdaBoostClassifier(DecisionTreeClassifier(max_depth=1), n_estimators=1, algorithm="SAMME").fit only.`);
    console.log(`  (b) first stump: rectboost feature ${b.firstStump?.feature} (weighted error ${b.firstStump?.weightedError.toFixed(4)}, minimizes error); scikit-learn feature ${fits[0].feature} (weighted error ${fits[0].weightedError.toFixed(4)}, the tree minimizes Gini impurity).`);
  }
  console.log(`  (c) lfw_subset ${c.window}×${c.window}, ${grouped(c.features)} features; train ${c.train.faces} faces + ${c.train.others} non-faces (even items), test ${c.test.faces} + ${c.test.others} (odd items); ` +
    `rectboost: one boosted stage, Discrete AdaBoost, uniform start, sign rule (${c.rectboost.roundsBoosted} rounds, ${c.rectboost.stoppedBecause}, ${seconds(c.rectboost.trainSeconds)} in 1 thread)` +
    (c.peer ? `; scikit-learn: SAMME, ${c.peer.estimatorsFitted} stumps fitted in ${seconds(c.peer.fitSeconds)}.` : '.'));
}
