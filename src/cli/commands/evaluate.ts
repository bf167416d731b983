import type { Command } from 'commander';
import { loadAnnotations } from '../../data/annotations.js';
import { loadPositiveWindows } from '../../data/positives.js';
import { cascadeUsesTiltedFeatures, type DetectorCascade } from '../../detect/detector-cascade.js';
import type { ScanStatistics } from '../../detect/scan-image.js';
import { RectboostError } from '../../errors.js';
import { packWindowSamples } from '../../features/window-samples.js';
import { writeFileAtomic } from '../../io/atomic-write.js';
import { loadModelFile } from '../../io/model-file.js';
import type { ReportInputs } from '../../io/report-files.js';
import { evaluateDetections, summarizeScans } from '../../metrics/detection-evaluation.js';
import type { Box } from '../../metrics/intersection-over-union.js';
import { evaluatePatches } from '../../metrics/patch-evaluation.js';
import { detectionErrors } from '../../metrics/match-detections.js';
import { writeErrorCrops } from '../../io/box-crops.js';
import { detectFiles } from '../../parallel/detect-files.js';
import { createProgressLine } from '../progress.js';
import { parseNumber } from '../parse-options.js';
import { addScanOptions, parseScanOptions, type ScanOptionText } from '../scan-options.js';
import { addReportOptions, writeReportFromInputs, type ReportFlags } from './report.js';

const rate = (value: number): string => `${(100 * value).toFixed(1)}%`;

/** Option text of evaluate's inputs (shared with `rectboost report`). */
export interface EvaluationFlags extends ScanOptionText {
  truth?: string;
  iou: string;
  positives?: string;
  negatives?: string;
}

/** Adds the evaluation inputs and the scan options to a command. */
export function addEvaluationOptions(command: Command): Command {
  command
    .option('--truth <file>', 'annotations: JSON Lines {"image", "boxes"} or COCO-style JSON')
    .option('--iou <ratio>', 'IoU a detection needs with a truth box to count as found', '0.5')
    .option('--positives <folder>', 'patch level: folder of object patches')
    .option('--negatives <folder>', 'patch level: folder of non-object patches');
  return addScanOptions(command);
}

/** An evaluation run: the JSON report, the terminal lines, and what a report page needs. */
export interface EvaluationRun {
  readonly json: unknown;
  readonly lines: readonly string[];
  readonly reportParts: Pick<ReportInputs, 'detection' | 'patches'>;
}

/**
 * Runs the evaluation the flags ask for, or returns null when they name no
 * inputs and `required` is false; `command` names the caller in messages.
 * @throws RectboostError `invalid-option` for a wrong combination of inputs.
 */
export async function runEvaluation(command: string, modelPath: string, detector: DetectorCascade, options: EvaluationFlags, required: boolean): Promise<EvaluationRun | null> {
  const iou = parseNumber('--iou', options.iou, 0, 1);
  const parsed = parseScanOptions(options);
  const patchMode = options.positives !== undefined || options.negatives !== undefined;
  if (!required && !patchMode && options.truth === undefined) return null;
  if (patchMode === (options.truth !== undefined) || (patchMode && (options.positives === undefined || options.negatives === undefined))) {
    throw new RectboostError('invalid-option', `${command} needs either --truth FILE, or both --positives DIR and --negatives DIR.`);
  }
  const lines: string[] = [];
  if (patchMode) {
    const load = async (folder: string) => {
      const loaded = await loadPositiveWindows(folder, { windowWidth: detector.windowWidth, windowHeight: detector.windowHeight, mirror: false, skipBad: false });
      return { samples: packWindowSamples(loaded.windows, detector.windowWidth, detector.windowHeight, undefined, { rotated: cascadeUsesTiltedFeatures(detector) }), windows: loaded.windows, sources: loaded.sources };
    };
    const positivePatches = await load(options.positives!);
    const negativePatches = await load(options.negatives!);
    const positives = positivePatches.samples;
    const negatives = negativePatches.samples;
    const result = evaluatePatches(detector, positives, negatives);
    const json = { mode: 'patches', model: modelPath, positives: positives.count, negatives: negatives.count, ...result, roc: {
      thresholds: Array.from(result.roc.thresholds), truePositiveRate: Array.from(result.roc.truePositiveRate),
      falsePositiveRate: Array.from(result.roc.falsePositiveRate), area: result.roc.area } };
    lines.push(`patches: ${positives.count} positive, ${negatives.count} negative`);
    lines.push(`cascade: detection ${rate(result.detectionRate)}, false positives ${rate(result.falsePositiveRate)}, ROC area ${result.roc.area.toFixed(4)}`);
    lines.push('stage  pos-reach  pos-pass  neg-reach  neg-pass');
    for (const s of result.stages) {
      lines.push(`${String(s.stage + 1).padStart(5)}  ${String(s.positivesReaching).padStart(9)}  ${rate(s.positivePassRate).padStart(8)}  ${String(s.negativesReaching).padStart(9)}  ${rate(s.negativePassRate).padStart(8)}`);
    }
    const patches = { positivesPath: options.positives!, negativesPath: options.negatives!, evaluation: result, positives: positivePatches, negatives: negativePatches };
    return { json, lines, reportParts: { patches } };
  }
  const truth = await loadAnnotations(options.truth!);
  const entries: Array<{ detections: Array<{ box: Box; score: number }>; truth: readonly Box[] }> = [];
  const statistics: ScanStatistics[] = [];
  let milliseconds = 0;
  const progress = createProgressLine('evaluate: images', truth.length, options.quiet === true);
  for await (const outcome of detectFiles(detector, truth.map((t) => t.image), {
    scan: parsed.scan, merge: parsed.merge, concurrency: parsed.concurrency,
    ...(parsed.workers === undefined ? {} : { workers: parsed.workers }),
  })) {
    progress.advance();
    if (outcome.kind === 'failed') {
      progress.finish();
      throw outcome.error;
    }
    const index = entries.length;
    entries.push({ detections: outcome.result.detections.map((d) => ({ box: d.box, score: d.score })), truth: truth[index]!.boxes });
    statistics.push(outcome.result.statistics);
    milliseconds += outcome.result.milliseconds;
  }
  progress.finish();
  const result = evaluateDetections(entries, iou);
  const speed = summarizeScans(statistics, milliseconds);
  const json = { mode: 'detections', model: modelPath, truth: options.truth, ...result, speed };
  lines.push(`images ${result.imageCount}, objects ${result.truthCount}, detections ${result.detectionCount} (${result.truePositives} matched at IoU ≥ ${iou})`);
  lines.push(`average precision (VOC all-point)      ${result.averagePrecision.toFixed(4)}`);
  lines.push(`detection rate at 1 / 10 / 100 FP      ${rate(result.detectionRateAtFalsePositives['1'])} / ${rate(result.detectionRateAtFalsePositives['10'])} / ${rate(result.detectionRateAtFalsePositives['100'])}`);
  lines.push(`log-average miss rate (FPPI 0.01–1)     ${rate(result.logAverageMissRate)}`);
  lines.push(`speed  ${(speed.windowsPerSecond / 1e6).toFixed(2)} M windows/s per thread, ${speed.meanFeaturesPerWindow.toFixed(2)} features/window`);
  lines.push(`rejected by stage  ${speed.rejectedAtStageShare.map((s, k) => `${k + 1}:${rate(s)}`).join(' ')}  flat:${rate(speed.flatShare)}  accepted:${(100 * speed.acceptedShare).toPrecision(2)}%`);
  const detection = { truthPath: options.truth!, imagePaths: truth.map((t) => t.image), entries, evaluation: result, speed, scan: parsed.scan };
  return { json, lines, reportParts: { detection } };
}

/** `rectboost evaluate MODEL --truth FILE | --positives DIR --negatives DIR` */
export function registerEvaluateCommand(program: Command): void {
  const command = program
    .command('evaluate')
    .description('measure a cascade on annotated images (detection level) or on labelled patches (patch level)')
    .argument('<model>', 'model JSON from rectboost train, or a runtime export');
  addReportOptions(addEvaluationOptions(command).option('--json <file>', 'write the full report (curves included) as JSON'), '--report')
    .option('--errors <folder>', 'with --truth: write every false alarm and missed object as a window-sized PNG crop into FOLDER/false-alarms and FOLDER/missed (feed the first to train --negative-patches)')
    .addHelpText('after', '\nExamples:\n  rectboost evaluate model.json --truth scenes/truth.jsonl --json report.json\n  rectboost evaluate model.json --truth scenes/truth.jsonl --report report.html --plots plots\n  rectboost evaluate model.json --positives patches/rivets --negatives patches/panels\n  rectboost evaluate model.json --truth scenes/truth.jsonl --errors errors/   then: rectboost train ... --negative-patches errors/false-alarms\n')
    .action(async (modelPath: string, options: EvaluationFlags & ReportFlags & { json?: string; errors?: string }) => {
      if (options.errors !== undefined && options.truth === undefined) {
        throw new RectboostError('invalid-option', '--errors writes the crops of scene detections; use it with --truth FILE.');
      }
      const loaded = await loadModelFile(modelPath, { require: 'any-cascade' });
      const run = (await runEvaluation('evaluate', modelPath, loaded.detector, options, true))!;
      const lines = [...run.lines];
      const detection = run.reportParts.detection;
      if (options.errors !== undefined && detection !== undefined) {
        const iou = parseNumber('--iou', options.iou, 0, 1);
        const { windowWidth, windowHeight } = loaded.detector;
        const written = await writeErrorCrops(options.errors, detection.imagePaths, detectionErrors(detection.entries, iou), windowWidth, windowHeight);
        lines.push(`crops: ${written.falseAlarms} false alarms in ${written.falseAlarmFolder}, ${written.misses} missed objects in ${written.missFolder}`);
      }
      process.stdout.write(`${lines.join('\n')}\n`);
      if (options.json !== undefined) await writeFileAtomic(options.json, `${JSON.stringify(run.json, null, 2)}\n`);
      await writeReportFromInputs(options, { modelPath, ...loaded, writtenBy: `rectboost evaluate, ${new Date().toISOString()}`, ...run.reportParts });
    });
}
