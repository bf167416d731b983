import { availableParallelism } from 'node:os';
import { basename, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Command } from 'commander';
import { formatRate } from '../../cascade/build-cascade.js';
import { loadAnnotations } from '../../data/annotations.js';
import { detectorCascadeFromModel } from '../../detect/detector-cascade.js';
import { writeFileAtomic } from '../../io/atomic-write.js';
import { DETECTION_COLOUR, TRUTH_COLOUR, drawBoxes } from '../../io/draw-boxes.js';
import { encodeRgbPng } from '../../io/encode-image.js';
import { trainModel } from '../../io/train-model.js';
import { evaluateDetections, summarizeScans } from '../../metrics/detection-evaluation.js';
import type { ScanStatistics } from '../../detect/scan-image.js';
import { assembleReportContent, writeReportFiles } from '../../io/report-files.js';
import type { Box } from '../../metrics/intersection-over-union.js';
import { detectFiles } from '../../parallel/detect-files.js';
import { parseInteger } from '../parse-options.js';
import { ProgressLine, formatDuration } from '../progress.js';
import { renderTable } from '../text-table.js';
import { detectionLine } from './detect.js';

/** The shipped demo data, beside dist/ in the package. */
const DEMO_DATA = fileURLToPath(new URL('../../../demo-patches/', import.meta.url));

/**
 * Settings of the demo run, chosen so that it finishes in about two minutes on
 * 2 cores: a 20×20 window (78,460 features instead of 162,336 at 24×24), 800
 * negatives a stage and up to 10 stages.
 */
export const DEMO_SETTINGS = {
  windowWidth: 20,
  windowHeight: 20,
  stageDetectionRate: 0.995,
  stageFalsePositiveRate: 0.4,
  targetFalsePositiveRate: 5e-5,
  maxStages: 10,
  maxWeakClassifiers: 60,
  negativesPerStage: 800,
  booster: 'gentle',
  validationShare: 0.2,
  seed: 1,
} as const;

interface DemoFlags {
  out: string;
  maxStages?: string;
  positives?: string;
  workers?: string;
  quiet?: boolean;
}

/** `rectboost demo`: the whole job on the shipped rivet-inspection data. */
export function registerDemoCommand(program: Command): void {
  program
    .command('demo')
    .description('train, run and measure a rivet detector on the shipped demo data (under two minutes on 2 cores)')
    .option('--out <folder>', 'where the model, detections and annotated scenes go', 'demo-output')
    .option('--max-stages <count>', 'fewer stages for a quicker look')
    .option('--positives <count>', 'use only the first COUNT positive patches')
    .option('--workers <count>', 'worker threads (default: all cores)')
    .option('--quiet', 'no progress lines')
    .addHelpText('after', '\nExamples:\n  rectboost demo\n  rectboost demo --out /tmp/rivets --max-stages 4\n')
    .action(async (flags: DemoFlags) => {
      await runDemo(flags);
    });
}

async function runDemo(flags: DemoFlags): Promise<void> {
  const started = performance.now();
  const out = resolve(flags.out);
  const maxStages = flags.maxStages === undefined ? DEMO_SETTINGS.maxStages : parseInteger('--max-stages', flags.maxStages, 1, 50);
  const positiveLimit = flags.positives === undefined ? Infinity : parseInteger('--positives', flags.positives, 10, 1_000_000);
  const workers = flags.workers === undefined ? availableParallelism() : parseInteger('--workers', flags.workers, 1, 256);
  const progress = new ProgressLine(flags.quiet === true);
  const say = (line: string): void => {
    if (flags.quiet !== true) {
      progress.clear();
      process.stdout.write(`${line}\n`);
    }
  };
  const { windowWidth, windowHeight } = DEMO_SETTINGS;

  say(`rectboost demo: rivet heads on sheet-metal panels (data in ${DEMO_DATA})`);
  const modelPath = join(out, 'rivets.json');
  let announced = false;
  const { model, result } = await trainModel({
    ...DEMO_SETTINGS,
    maxStages,
    positives: join(DEMO_DATA, 'positives'),
    backgrounds: join(DEMO_DATA, 'backgrounds'),
    out: modelPath,
    mirror: false,
    memoryBytes: 2 * 1024 ** 3,
    workers,
    recordTiming: false,
    tool: 'rectboost demo',
    ...(positiveLimit === Infinity ? {} : { positiveLimit }),
    onEvent: (event) => {
      if (event.phase === 'reading') {
        progress.update(event.what, `reading ${event.what}`, event.done, event.total);
      } else if (event.phase === 'data' && !announced) {
        announced = true;
        say(`1. train: ${event.positives} rivet patches, ${event.backgroundImages} bare panels, window ${windowWidth}×${windowHeight}, up to ${maxStages} stages`);
      } else if (event.phase === 'mining') {
        progress.update(`mining-${event.stageIndex}`, `   stage ${event.stageIndex + 1}: mining negatives`, event.found, event.wanted);
      } else if (event.phase === 'responses') {
        progress.update(`responses-${event.stageIndex}`, `   stage ${event.stageIndex + 1}: computing feature responses on ${event.samples} windows`, undefined, undefined, true);
      } else if (event.phase === 'boosting') {
        progress.update(`boosting-${event.stageIndex}`, `   stage ${event.stageIndex + 1}: ${event.weakClassifiers} weak classifiers, false positives ${event.falsePositiveRate.toFixed(3)}`);
      } else if (event.phase === 'warning') {
        say(`   warning: ${event.message}`);
      } else if (event.phase === 'stage-finished') {
        const r = event.report;
        say(`   stage ${r.stageIndex + 1}: ${r.weakClassifiers} weak classifiers, keeps ${(100 * r.detectionRate).toFixed(1)}% of rivets, overall false positives ${formatRate(r.overallFalsePositiveRate)} (${formatDuration(r.seconds)})`);
      }
    },
  });
  say(`   ${result.stopMessage}`);

  const truthPath = join(DEMO_DATA, 'scenes', 'truth.jsonl');
  const truth = await loadAnnotations(truthPath);
  say(`2. detect: ${truth.length} test panels, boxes drawn in ${join(out, 'scenes')} (amber: found, green: truth)`);
  const detector = detectorCascadeFromModel(model);
  const lines: string[] = [];
  const entries: Array<{ detections: Array<{ box: Box; score: number }>; truth: readonly Box[] }> = [];
  const perScene: Array<[string, number, number, number]> = [];
  const statistics: ScanStatistics[] = [];
  let scanMilliseconds = 0;
  let index = 0;
  for await (const outcome of detectFiles(detector, truth.map((t) => t.image), { workers, merge: { method: 'mean', overlap: 0.5, minSupport: 3 } })) {
    if (outcome.kind === 'failed') throw outcome.error;
    const sceneTruth = truth[index]!.boxes;
    index++;
    lines.push(detectionLine(outcome.result));
    statistics.push(outcome.result.statistics);
    scanMilliseconds += outcome.result.milliseconds;
    entries.push({ detections: outcome.result.detections.map((d) => ({ box: d.box, score: d.score })), truth: sceneTruth });
    const found = evaluateDetections([{ detections: outcome.result.detections.map((d) => ({ box: d.box, score: d.score })), truth: sceneTruth }]);
    perScene.push([basename(outcome.result.image), sceneTruth.length, found.truePositives, outcome.result.detections.length - found.truePositives]);
    const drawing = drawBoxes(outcome.pixels, [
      { boxes: sceneTruth, colour: TRUTH_COLOUR },
      { boxes: outcome.result.detections.map((d) => d.box), colour: DETECTION_COLOUR },
    ]);
    await writeFileAtomic(join(out, 'scenes', basename(outcome.result.image).replace(/\.[^.]+$/, '.png')), await encodeRgbPng(drawing));
  }
  await writeFileAtomic(join(out, 'detections.jsonl'), `${lines.join('\n')}\n`);

  const evaluation = evaluateDetections(entries);
  const falsePositives = evaluation.detectionCount - evaluation.truePositives;
  const report = {
    averagePrecision: evaluation.averagePrecision,
    detectionRate: evaluation.truePositives / Math.max(1, evaluation.truthCount),
    falsePositivesPerImage: falsePositives / Math.max(1, evaluation.imageCount),
    stages: model.stages.length,
    weakClassifiers: model.stages.reduce((n, s) => n + s.weakClassifiers.length, 0),
    seconds: (performance.now() - started) / 1000,
    scenes: perScene.map(([image, rivets, found, falseAlarms]) => ({ image, rivets, found, falseAlarms })),
  };
  await writeFileAtomic(join(out, 'report.json'), `${JSON.stringify(report, null, 2)}\n`);
  const page = await assembleReportContent({
    // Paths as the user would type them: the model relative to the working folder, the truth inside the package.
    title: 'rectboost demo: rivet heads on sheet-metal panels', modelPath: relative(process.cwd(), modelPath) || modelPath,
    detector: detectorCascadeFromModel(model), model, writtenBy: `rectboost demo, ${new Date().toISOString()}`,
    detection: { truthPath: relative(join(DEMO_DATA, '..'), truthPath), imagePaths: truth.map((t) => t.image), entries, evaluation, speed: summarizeScans(statistics, scanMilliseconds), scan: {} },
  });
  await writeReportFiles(page, join(out, 'report.html'), join(out, 'plots'));
  progress.clear();
  if (flags.quiet !== true) {
    process.stdout.write(`3. evaluate (IoU ≥ 0.5):\n`);
    process.stdout.write(renderTable('   per panel', ['panel', 'rivets', 'found', 'false alarms'], perScene).replace(/^/gm, '   '));
    process.stdout.write(
      `   average precision ${report.averagePrecision.toFixed(3)}, detection rate ${(100 * report.detectionRate).toFixed(1)}%, ` +
        `${report.falsePositivesPerImage.toFixed(2)} false alarms per panel\n`,
    );
    process.stdout.write(`Done in ${formatDuration(report.seconds)}. Written:\n`);
    process.stdout.write(`   ${modelPath}  (the cascade; try: rectboost inspect ${modelPath})\n`);
    process.stdout.write(`   ${join(out, 'detections.jsonl')}  (one JSON line per panel)\n`);
    process.stdout.write(`   ${join(out, 'scenes')}/  (panels with boxes drawn)\n`);
    process.stdout.write(`   ${join(out, 'report.json')}  (the figures above)\n`);
    process.stdout.write(`   ${join(out, 'report.html')}  (the visual report: open it in a browser, works offline)\n`);
    process.stdout.write(`   ${join(out, 'plots')}/  (its charts as PNG files)\n`);
  }
}
