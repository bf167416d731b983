import { resolve } from 'node:path';
import type { Command } from 'commander';
import type { BoosterKind } from '../../boost/booster.js';
import { MAX_TREE_DEPTH } from '../../cascade/cascade-model.js';
import { DEFAULT_NEGATIVE_PATCH_SHARE, formatRate, type StageReport } from '../../cascade/build-cascade.js';
import { RectboostError } from '../../errors.js';
import { detectorCascadeFromModel } from '../../detect/detector-cascade.js';
import { MAX_WINDOW_SIDE } from '../../features/enumerate-features.js';
import { TOOL_NAME, TRAINING_DEFAULTS as DEFAULTS, trainModel, type TrainedModel, type TrainModelEvent, type TrainModelOptions } from '../../jobs/train-model.js';
import { parseChoice, parseInteger, parseNumber, parseWindowSize } from '../parse-options.js';
import { ProgressLine, formatCount, formatDuration } from '../progress.js';
import { renderTable } from '../text-table.js';
import { addReportOptions, writeReportFromInputs, type ReportFlags } from './report.js';

interface TrainFlags extends ReportFlags {
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
  keepGoing?: boolean;
  negativePatches?: string;
  negativePatchShare: string;
  augment: string;
  weakDepth: string;
}

/** `rectboost train`: folders in, model JSON out, with checkpoints after every stage. */
export function registerTrainCommand(program: Command): void {
  addReportOptions(program
    .command('train')
    .description('train a cascade from a folder of positive patches and a folder of background images')
    .option('--positives <path>', 'folder of positive patch images (any size; resized to the window), or an annotation file of boxes on full images')
    .option('--backgrounds <folder>', 'folder of images that contain no object')
    .option('--out <file>', 'where to write the model JSON')
    .option('--window <WxH>', 'detector window in pixels', `${DEFAULTS.windowWidth}x${DEFAULTS.windowHeight}`)
    .option('--stage-detection <rate>', 'minimum detection rate each stage keeps on validation positives', String(DEFAULTS.stageDetectionRate))
    .option('--stage-false-positive <rate>', 'maximum false-positive rate each stage lets through', String(DEFAULTS.stageFalsePositiveRate))
    .option('--target-false-positive <rate>', 'stop when the product of stage false-positive rates reaches this', String(DEFAULTS.targetFalsePositiveRate))
    .option('--max-stages <count>', 'most stages to train', String(DEFAULTS.maxStages))
    .option('--max-weak <count>', 'most weak classifiers per stage', String(DEFAULTS.maxWeakClassifiers))
    .option('--negatives <count>', 'negatives mined for every stage', String(DEFAULTS.negativesPerStage))
    .option('--booster <kind>', 'discrete or gentle AdaBoost', DEFAULTS.booster)
    .option('--weak-depth <levels>', 'depth of each weak classifier: 1 boosts decision stumps, 2 or 3 small decision trees', '1')
    .option('--features <set>', 'feature set: basic (the five upright kinds) or extended (adds 45° tilted and centre-surround kinds)', 'basic')
    .option('--mirror', 'add left-right mirrored copies of the positives')
    .option('--augment <copies>', 'seeded augmented copies of every training positive (small shifts, scales, rotations, contrast and brightness)', '0')
    .option('--negative-patches <folder>', 'folder of windows to be rejected (confusable objects, or the false-alarms folder of rectboost evaluate --errors); every stage uses those it still accepts')
    .option('--negative-patch-share <share>', 'largest share of each stage\'s negatives taken from --negative-patches; the rest are mined from the backgrounds', String(DEFAULT_NEGATIVE_PATCH_SHARE))
    .option('--validation <share>', 'share of positives held out to set stage thresholds', String(DEFAULTS.validationShare))
    .option('--seed <number>', 'seed of every random choice', String(DEFAULTS.seed))
    .option('--workers <count>', 'worker threads for boosting (default: all cores)')
    .option('--memory <GB>', 'cap for the precomputed feature responses', String(DEFAULTS.memoryBytes / 1024 ** 3))
    .option('--checkpoint <folder>', 'where finished stages are saved (default: OUT.checkpoint)')
    .option('--resume', 'continue from the checkpoint of an interrupted run with the same options and data')
    .option('--keep-going', 'train on after a stage uses --max-weak weak classifiers without reaching --stage-false-positive (default: stop there and save)')
    .option('--skip-bad', 'train without unreadable images instead of stopping')
    .option('--no-timing', 'leave wall-clock times out of the model, for byte-for-byte reproducible files')
    .option('--quiet', 'no progress or stage lines on stderr'), '--report')
    .addHelpText(
      'after',
      `
Examples:
  rectboost train --positives demo-patches/positives --backgrounds demo-patches/backgrounds --out rivets.json
  rectboost train --positives faces/ --backgrounds street/ --out faces.json --window 20x20 --mirror --max-stages 12
  rectboost train ... --resume            continue after Ctrl-C; OUT already holds the finished stages
  rectboost evaluate rivets.json --truth scenes/truth.jsonl --errors errors/
  rectboost train ... --negative-patches errors/false-alarms --out rivets2.json   train again, rejecting them

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
  const positives = required(flags.positives, '--positives FOLDER_OR_ANNOTATIONS');
  const backgrounds = required(flags.backgrounds, '--backgrounds FOLDER');
  const out = required(flags.out, '--out FILE');
  const window = parseWindowSize('--window', flags.window, 4, MAX_WINDOW_SIDE);
  const featureSet = parseChoice('--features', flags.features, ['basic', 'extended']);
  const options: TrainModelOptions = {
    positives,
    backgrounds,
    out,
    windowWidth: window.width,
    windowHeight: window.height,
    stageDetectionRate: parseNumber('--stage-detection', flags.stageDetection, 0.5, 1),
    stageFalsePositiveRate: parseNumber('--stage-false-positive', flags.stageFalsePositive, 0.001, 0.999),
    targetFalsePositiveRate: parseNumber('--target-false-positive', flags.targetFalsePositive, 1e-12, 0.999),
    maxStages: parseInteger('--max-stages', flags.maxStages, 1, 1000),
    maxWeakClassifiers: parseInteger('--max-weak', flags.maxWeak, 1, 10_000),
    negativesPerStage: parseInteger('--negatives', flags.negatives, 10, 10_000_000),
    booster: parseChoice<BoosterKind>('--booster', flags.booster, ['discrete', 'gentle']),
    mirror: flags.mirror === true,
    validationShare: parseNumber('--validation', flags.validation, 0, 0.9),
    seed: parseInteger('--seed', flags.seed, 0, 2 ** 31 - 1),
    memoryBytes: parseNumber('--memory', flags.memory, 0.01, 1024) * 1024 ** 3,
    featureSet,
    ...(flags.workers === undefined ? {} : { workers: parseInteger('--workers', flags.workers, 1, 256) }),
    ...(flags.checkpoint === undefined ? {} : { checkpointDirectory: flags.checkpoint }),
    resume: flags.resume === true,
    skipBad: flags.skipBad === true,
    recordTiming: flags.timing,
    keepGoing: flags.keepGoing === true,
    ...(flags.negativePatches === undefined ? {} : { negativePatches: flags.negativePatches }),
    negativePatchShare: parseNumber('--negative-patch-share', flags.negativePatchShare, 0, 1),
    augmentCopies: parseInteger('--augment', flags.augment, 0, 100),
    weakDepth: parseInteger('--weak-depth', flags.weakDepth, 1, MAX_TREE_DEPTH),
  };
  const progress = new ProgressLine(flags.quiet === true);

  // Ctrl-C (or SIGTERM): stop after the current step; the finished stages are written.
  const controller = new AbortController();
  const onSignal = (): void => {
    if (controller.signal.aborted) process.exit(130);
    controller.abort();
    progress.log('stopping after the current step; finished stages are kept (press Ctrl-C again to quit at once)');
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  let trained: TrainedModel;
  try {
    trained = await trainModel({ ...options, signal: controller.signal, onEvent: (event) => showEvent(progress, event, options) });
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
    progress.clear();
  }
  const { result, written, checkpointDirectory } = trained;
  if (result.stopReason === 'interrupted') {
    const finished = `${result.stages.length} finished stage${result.stages.length === 1 ? '' : 's'}`;
    throw new RectboostError(
      'interrupted',
      written
        ? `Training interrupted after ${finished}: ${resolve(out)} holds them as a usable model (stop reason "interrupted"), and ${checkpointDirectory} keeps them for --resume. Run the same command with --resume to continue.`
        : `Training interrupted before its first stage finished; nothing was saved. Run the same command to start again.`,
    );
  }
  if (flags.quiet !== true) {
    process.stderr.write(stageTable(result.reports, options.negativePatches !== undefined));
    process.stderr.write(`${result.stopMessage}\n`);
    process.stderr.write(`Model written to ${resolve(out)} in ${formatDuration(trained.seconds)}.\n`);
  }
  await writeReportFromInputs(flags, { modelPath: out, detector: detectorCascadeFromModel(trained.model), model: trained.model, writtenBy: `${TOOL_NAME} train, ${new Date().toISOString()}` });
}

function showEvent(progress: ProgressLine, event: TrainModelEvent, options: TrainModelOptions): void {
  switch (event.phase) {
    case 'reading':
      progress.update(event.what, `checking ${event.what}`, event.done, event.total);
      break;
    case 'skipped':
      progress.log(`skipped: ${event.line}`);
      break;
    case 'data':
      progress.log(
        `data: ${event.positives} positives${options.mirror ? ' (+ mirrored copies)' : ''}${options.augmentCopies ? ` (+ ${options.augmentCopies} augmented copies each in training)` : ''}, ` +
          `${event.backgroundImages} background images${options.negativePatches === undefined ? '' : `, ${event.negativePatches} negative patches`}; ` +
          `window ${options.windowWidth}×${options.windowHeight}, ${options.booster} AdaBoost${options.weakDepth !== undefined && options.weakDepth > 1 ? ` on depth-${options.weakDepth} trees` : ''}, ${event.workers} worker${event.workers === 1 ? '' : 's'}`,
      );
      break;
    case 'resumed':
      progress.log(`resuming after ${event.stages} finished stage${event.stages === 1 ? '' : 's'} from ${event.checkpointDirectory}`);
      break;
    case 'no-checkpoint':
      progress.log(`no checkpoint in ${event.checkpointDirectory} yet (the earlier run finished no stage); starting from the first stage`);
      break;
    case 'warning':
      progress.log(`warning: ${event.message}`);
      break;
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
          `overall ${formatRate(r.overallFalsePositiveRate)}, ${negativeSources(r)}` +
          `${r.miningWindowsPerSecond === undefined ? '' : ` (mining ${(r.miningWindowsPerSecond / 1e6).toFixed(1)} M windows/s)`}, ${formatDuration(r.seconds)}`,
      );
      break;
    }
  }
}

/** Where a stage's negatives came from, for its progress line. */
function negativeSources(r: StageReport): string {
  const mined = r.negatives - r.negativesFromPatches;
  const patches = r.negativesFromPatches > 0 ? ` (${r.negativesFromPatches} negative patches, ${mined} mined)` : '';
  return `${r.negatives} negatives${patches} from ${formatCount(r.windowsScanned)} windows`;
}

/**
 * The summary table. "windows/negative" is background windows scanned per mined negative
 * (its inverse is the cascade's acceptance rate on the backgrounds); with negative patches a
 * "patches" column says how many of the negatives were still-accepted patches.
 */
function stageTable(reports: readonly StageReport[], withPatches: boolean): string {
  return renderTable(
    'Stages',
    ['stage', 'weak', 'detection', 'false pos.', 'overall f.p.', 'negatives', ...(withPatches ? ['patches'] : []), 'windows/negative', 'seconds'],
    reports.map((r) => {
      const mined = r.negatives - r.negativesFromPatches;
      return [
        r.stageIndex + 1,
        r.weakClassifiers,
        r.detectionRate.toFixed(4),
        r.falsePositiveRate.toFixed(4),
        formatRate(r.overallFalsePositiveRate),
        r.negatives,
        ...(withPatches ? [r.negativesFromPatches] : []),
        mined > 0 ? (r.windowsScanned / mined).toFixed(1) : '-',
        r.seconds.toFixed(1),
      ];
    }),
  );
}

