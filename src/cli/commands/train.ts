import { availableParallelism } from 'node:os';
import { resolve } from 'node:path';
import type { Command } from 'commander';
import type { BoosterKind } from '../../boost/booster.js';
import { heldOutCount, trainCascade, formatRate, type StageReport, type TrainingEvent } from '../../cascade/build-cascade.js';
import { newCascadeModel, type CascadeModel, type Stage } from '../../cascade/cascade-model.js';
import { loadBackgroundImages } from '../../data/backgrounds.js';
import { loadPositiveWindows } from '../../data/positives.js';
import { RectboostError, isRectboostError } from '../../errors.js';
import { MAX_WINDOW_SIDE } from '../../features/enumerate-features.js';
import { readCheckpoint, removeCheckpoint, writeCheckpoint, type TrainingFingerprint } from '../../io/checkpoint.js';
import { saveCascadeModel } from '../../io/model-file.js';
import { createBoostingPool, type BoostingPool } from '../../parallel/boosting-pool.js';
import { parseChoice, parseInteger, parseNumber, parseWindowSize } from '../parse-options.js';
import { ProgressLine, formatCount, formatDuration } from '../progress.js';
import { renderTable } from '../text-table.js';

interface TrainFlags {
  positives?: string;
  backgrounds?: string;
  out?: string;
  window: string;
  stageDetection: string;
  stageFalsePositive: string;
  targetFalsePositive: string;
  maxStages: string;
  maxWeak: string;
  negatives: string;
  booster: string;
  features: string;
  mirror?: boolean;
  validation: string;
  seed: string;
  workers?: string;
  memory: string;
  checkpoint?: string;
  resume?: boolean;
  skipBad?: boolean;
  quiet?: boolean;
  timing: boolean;
}

const TOOL = 'rectboost 0.1.0';

/** `rectboost train`: folders in, model JSON out, with checkpoints after every stage. */
export function registerTrainCommand(program: Command): void {
  program
    .command('train')
    .description('train a cascade from a folder of positive patches and a folder of background images')
    .option('--positives <path>', 'folder of positive patch images (any size; resized to the window), or an annotation file of boxes on full images')
    .option('--backgrounds <folder>', 'folder of images that contain no object')
    .option('--out <file>', 'where to write the model JSON')
    .option('--window <WxH>', 'detector window in pixels', '24x24')
    .option('--stage-detection <rate>', 'minimum detection rate each stage keeps on validation positives', '0.995')
    .option('--stage-false-positive <rate>', 'maximum false-positive rate each stage lets through', '0.5')
    .option('--target-false-positive <rate>', 'stop when the product of stage false-positive rates reaches this', '1e-5')
    .option('--max-stages <count>', 'most stages to train', '20')
    .option('--max-weak <count>', 'most weak classifiers per stage', '200')
    .option('--negatives <count>', 'negatives mined for every stage', '2000')
    .option('--booster <kind>', 'discrete or gentle AdaBoost', 'gentle')
    .option('--features <set>', 'feature set: basic (extended is not built yet)', 'basic')
    .option('--mirror', 'add left-right mirrored copies of the positives')
    .option('--validation <share>', 'share of positives held out to set stage thresholds', '0.2')
    .option('--seed <number>', 'seed of every random choice', '1')
    .option('--workers <count>', 'worker threads for boosting (default: all cores)')
    .option('--memory <GB>', 'cap for the precomputed feature responses', '4')
    .option('--checkpoint <folder>', 'where finished stages are saved (default: OUT.checkpoint)')
    .option('--resume', 'continue from the checkpoint of an interrupted run with the same options and data')
    .option('--skip-bad', 'train without unreadable images instead of stopping')
    .option('--no-timing', 'leave wall-clock times out of the model, for byte-for-byte reproducible files')
    .option('--quiet', 'no progress or stage lines on stderr')
    .addHelpText(
      'after',
      `
Examples:
  rectboost train --positives demo-patches/positives --backgrounds demo-patches/backgrounds --out rivets.json
  rectboost train --positives faces/ --backgrounds street/ --out faces.json --window 20x20 --mirror --max-stages 12
  rectboost train ... --resume            continue after Ctrl-C; finished stages are kept

Each stage keeps --stage-detection of the positives and passes at most --stage-false-positive of the
negatives, so K stages give roughly d^K detection and f^K false positives overall (Viola & Jones 2001).`,
    )
    .action(async (flags: TrainFlags) => {
      await runTrain(flags);
    });
}

async function runTrain(flags: TrainFlags): Promise<void> {
  const required = (value: string | undefined, option: string): string => {
    if (value === undefined) throw new RectboostError('invalid-option', `train needs ${option}; see rectboost train --help.`);
    return value;
  };
  const positivesPath = required(flags.positives, '--positives FOLDER_OR_ANNOTATIONS');
  const backgroundsPath = required(flags.backgrounds, '--backgrounds FOLDER');
  const out = required(flags.out, '--out FILE');
  const window = parseWindowSize('--window', flags.window, 4, MAX_WINDOW_SIDE);
  const stageDetectionRate = parseNumber('--stage-detection', flags.stageDetection, 0.5, 1);
  const stageFalsePositiveRate = parseNumber('--stage-false-positive', flags.stageFalsePositive, 0.001, 0.999);
  const targetFalsePositiveRate = parseNumber('--target-false-positive', flags.targetFalsePositive, 1e-12, 0.999);
  const maxStages = parseInteger('--max-stages', flags.maxStages, 1, 1000);
  const maxWeakClassifiers = parseInteger('--max-weak', flags.maxWeak, 1, 10_000);
  const negativesPerStage = parseInteger('--negatives', flags.negatives, 10, 10_000_000);
  const booster = parseChoice<BoosterKind>('--booster', flags.booster, ['discrete', 'gentle']);
  const featureSet = parseChoice('--features', flags.features, ['basic', 'extended']);
  if (featureSet === 'extended') {
    throw new RectboostError('invalid-option', '--features extended (tilted and centre-surround features) is not built yet; use --features basic.');
  }
  const validationShare = parseNumber('--validation', flags.validation, 0, 0.9);
  const seed = parseInteger('--seed', flags.seed, 0, 2 ** 31 - 1);
  const workers = flags.workers === undefined ? availableParallelism() : parseInteger('--workers', flags.workers, 1, 256);
  const memoryBytes = parseNumber('--memory', flags.memory, 0.01, 1024) * 1024 ** 3;
  const checkpointDirectory = flags.checkpoint ?? `${out.replace(/\.json$/i, '')}.checkpoint`;
  const mirror = flags.mirror === true;
  const skipBad = flags.skipBad === true;
  const progress = new ProgressLine(flags.quiet === true);
  const started = performance.now();

  // 1. Check every input before any long work.
  const positives = await loadPositiveWindows(positivesPath, {
    windowWidth: window.width,
    windowHeight: window.height,
    mirror: false,
    skipBad,
    onProgress: (done, total) => progress.update('positives', 'checking positives', done, total),
  });
  const backgrounds = await loadBackgroundImages(backgroundsPath, {
    windowWidth: window.width,
    windowHeight: window.height,
    skipBad,
    onProgress: (done, total) => progress.update('backgrounds', 'checking backgrounds', done, total),
  });
  for (const line of [...positives.skipped, ...backgrounds.skipped]) progress.log(`skipped: ${line.trim()}`);
  const minimumPositives = validationShare > 0 ? 3 : 2;
  if (positives.sourceCount < minimumPositives) {
    throw new RectboostError('bad-data', `Training needs at least ${minimumPositives} positive patches; ${positivesPath} has ${positives.sourceCount}.`);
  }
  progress.log(
    `data: ${positives.sourceCount} positives${mirror ? ' (+ mirrored copies)' : ''}, ${backgrounds.images.length} background images; ` +
      `window ${window.width}×${window.height}, ${booster} AdaBoost, ${workers} worker${workers === 1 ? '' : 's'}`,
  );

  const options = {
    window: `${window.width}x${window.height}`,
    stageDetection: stageDetectionRate,
    stageFalsePositive: stageFalsePositiveRate,
    targetFalsePositive: targetFalsePositiveRate,
    maxStages,
    maxWeak: maxWeakClassifiers,
    negatives: negativesPerStage,
    booster,
    features: featureSet,
    mirror,
    validation: validationShare,
    memory: memoryBytes,
  };
  const fingerprint: TrainingFingerprint = { ...options, seed, positivesHash: positives.contentHash, backgroundsHash: backgrounds.contentHash };
  let completedStages: readonly Stage[] = [];
  let stageSeconds: number[] = [];
  if (flags.resume === true) {
    const checkpoint = await readCheckpoint(checkpointDirectory, fingerprint);
    completedStages = checkpoint.model.stages;
    stageSeconds = [...checkpoint.stageSeconds];
    progress.log(`resuming after ${completedStages.length} finished stage${completedStages.length === 1 ? '' : 's'} from ${checkpointDirectory}`);
  }

  const buildModel = (stages: readonly Stage[], stopReason: string, meanPositive?: number[]): CascadeModel =>
    newCascadeModel(window, stages, {
      ...(meanPositive === undefined ? {} : { meanPositive }),
      training: {
        tool: TOOL,
        seed,
        options,
        data: {
          positives: positives.sourceCount,
          validationPositives: heldOutCount(positives.sourceCount, validationShare),
          backgroundImages: backgrounds.images.length,
          positivesHash: positives.contentHash,
          backgroundsHash: backgrounds.contentHash,
        },
        stopReason,
        ...(flags.timing
          ? { timing: { createdAt: new Date().toISOString(), totalSeconds: round3(stageSeconds.reduce((a, b) => a + b, 0)), stageSeconds: stageSeconds.map(round3) } }
          : {}),
      },
    });

  // 2. Ctrl-C: stop between units of work, after any checkpoint write in progress.
  let interruptRequested = false;
  const onSignal = (): void => {
    if (interruptRequested) process.exit(130);
    interruptRequested = true;
    progress.log('stopping after the current step; finished stages are kept (press Ctrl-C again to quit at once)');
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  let pool: BoostingPool | undefined;
  try {
    pool = await createBoostingPool(workers);
    const result = await trainCascade({
      windowWidth: window.width,
      windowHeight: window.height,
      positives: positives.windows,
      backgrounds: backgrounds.images.filter((image) => image.width >= window.width && image.height >= window.height),
      stageDetectionRate,
      stageFalsePositiveRate,
      targetFalsePositiveRate,
      maxStages,
      maxWeakClassifiers,
      negativesPerStage,
      booster,
      mirror,
      validationShare,
      seed,
      memoryBytes,
      pool,
      completedStages,
      shouldStop: () => interruptRequested,
      onEvent: (event) => showEvent(progress, event),
      onStageFinished: async (stages, report) => {
        stageSeconds.push(report.seconds);
        await writeCheckpoint(checkpointDirectory, { model: buildModel(stages, 'interrupted'), fingerprint, stageSeconds });
      },
    });
    await saveCascadeModel(out, buildModel(result.stages, result.stopMessage, result.meanPositive));
    await removeCheckpoint(checkpointDirectory);
    progress.clear();
    if (flags.quiet !== true) {
      process.stderr.write(stageTable(result.reports));
      process.stderr.write(`${result.stopMessage}\n`);
      process.stderr.write(`Model written to ${resolve(out)} in ${formatDuration((performance.now() - started) / 1000)}.\n`);
    }
  } catch (error) {
    progress.clear();
    if (isRectboostError(error, 'interrupted')) {
      throw new RectboostError(
        'interrupted',
        `Training interrupted; finished stages are saved in ${checkpointDirectory}. Run the same command with --resume to continue.`,
      );
    }
    throw error;
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
    await pool?.close();
  }
}

function showEvent(progress: ProgressLine, event: TrainingEvent): void {
  switch (event.phase) {
    case 'mining':
      progress.update(
        `mining-${event.stageIndex}`,
        `stage ${event.stageIndex + 1}: mining negatives (${formatCount(event.scanned)} windows scanned)`,
        event.found,
        event.wanted,
      );
      break;
    case 'responses':
      progress.update(
        `responses-${event.stageIndex}`,
        `stage ${event.stageIndex + 1}: computing ${formatCount(event.features)} feature responses on ${event.samples} windows`,
        undefined,
        undefined,
        true,
      );
      break;
    case 'boosting':
      progress.update(
        `boosting-${event.stageIndex}`,
        `stage ${event.stageIndex + 1}: ${event.weakClassifiers} weak classifiers, detection ${event.detectionRate.toFixed(4)}, false positives ${event.falsePositiveRate.toFixed(4)}`,
      );
      break;
    case 'stage-finished': {
      const r = event.report;
      progress.log(
        `stage ${r.stageIndex + 1} saved: ${r.weakClassifiers} weak, detection ${r.detectionRate.toFixed(4)}, false positives ${r.falsePositiveRate.toFixed(4)}, ` +
          `overall ${formatRate(r.overallFalsePositiveRate)}, ${r.negatives} negatives from ${formatCount(r.windowsScanned)} windows` +
          `${r.miningWindowsPerSecond === undefined ? '' : ` (mining ${(r.miningWindowsPerSecond / 1e6).toFixed(1)} M windows/s)`}, ${formatDuration(r.seconds)}`,
      );
      break;
    }
  }
}

function stageTable(reports: readonly StageReport[]): string {
  return renderTable(
    'Stages',
    ['stage', 'weak', 'detection', 'false pos.', 'overall f.p.', 'negatives', 'windows/negative', 'seconds'],
    reports.map((r) => [
      r.stageIndex + 1,
      r.weakClassifiers,
      r.detectionRate.toFixed(4),
      r.falsePositiveRate.toFixed(4),
      formatRate(r.overallFalsePositiveRate),
      r.negatives,
      r.negatives > 0 ? (r.windowsScanned / r.negatives).toFixed(1) : '-',
      r.seconds.toFixed(1),
    ]),
  );
}

function round3(value: number): number {
  return Math.round(value * 1000) / 1000;
}
