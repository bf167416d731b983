import type { Command } from 'commander';
import { loadAnnotations } from '../../data/annotations.js';
import { loadPositiveWindows } from '../../data/positives.js';
import { RectboostError } from '../../errors.js';
import { packWindowSamples } from '../../features/window-samples.js';
import { writeFileAtomic } from '../../io/atomic-write.js';
import { evaluateDetections, summarizeScans } from '../../metrics/detection-evaluation.js';
import { evaluatePatches } from '../../metrics/patch-evaluation.js';
import { detectFiles } from '../../parallel/detect-files.js';
import type { ScanStatistics } from '../../detect/scan-image.js';
import type { Box } from '../../metrics/intersection-over-union.js';
import { loadModelFile } from '../../io/model-file.js';
import { createProgressLine } from '../progress.js';
import { parseNumber } from '../parse-options.js';
import { addScanOptions, parseScanOptions, type ScanOptionText } from '../scan-options.js';

const rate = (value: number): string => `${(100 * value).toFixed(1)}%`;

/** `rectboost evaluate MODEL --truth FILE | --positives DIR --negatives DIR` */
export function registerEvaluateCommand(program: Command): void {
  const command = program
    .command('evaluate')
    .description('measure a cascade on annotated images (detection level) or on labelled patches (patch level)')
    .argument('<model>', 'model JSON from rectboost train, or a runtime export')
    .option('--truth <file>', 'annotations: JSON Lines {"image", "boxes"} or COCO-style JSON')
    .option('--iou <ratio>', 'IoU a detection needs with a truth box to count as found', '0.5')
    .option('--positives <folder>', 'patch level: folder of object patches')
    .option('--negatives <folder>', 'patch level: folder of non-object patches')
    .option('--json <file>', 'write the full report (curves included) as JSON');
  addScanOptions(command)
    .addHelpText('after', '\nExamples:\n  rectboost evaluate model.json --truth scenes/truth.jsonl --json report.json\n  rectboost evaluate model.json --positives patches/rivets --negatives patches/panels\n')
    .action(async (modelPath: string, options: ScanOptionText & { truth?: string; iou: string; positives?: string; negatives?: string; json?: string }) => {
      const iou = parseNumber('--iou', options.iou, 0, 1);
      const parsed = parseScanOptions(options);
      const patchMode = options.positives !== undefined || options.negatives !== undefined;
      if (patchMode === (options.truth !== undefined) || (patchMode && (options.positives === undefined || options.negatives === undefined))) {
        throw new RectboostError('invalid-option', 'evaluate needs either --truth FILE, or both --positives DIR and --negatives DIR.');
      }
      const { detector } = await loadModelFile(modelPath, { require: 'any-cascade' });
      let report: unknown;
      const lines: string[] = [];
      if (patchMode) {
        const load = async (folder: string) => packWindowSamples(
          (await loadPositiveWindows(folder, { windowWidth: detector.windowWidth, windowHeight: detector.windowHeight, mirror: false, skipBad: false })).windows,
          detector.windowWidth, detector.windowHeight,
        );
        const positives = await load(options.positives!);
        const negatives = await load(options.negatives!);
        const result = evaluatePatches(detector, positives, negatives);
        report = { mode: 'patches', model: modelPath, positives: positives.count, negatives: negatives.count, ...result, roc: {
          thresholds: Array.from(result.roc.thresholds), truePositiveRate: Array.from(result.roc.truePositiveRate),
          falsePositiveRate: Array.from(result.roc.falsePositiveRate), area: result.roc.area } };
        lines.push(`patches: ${positives.count} positive, ${negatives.count} negative`);
        lines.push(`cascade: detection ${rate(result.detectionRate)}, false positives ${rate(result.falsePositiveRate)}, ROC area ${result.roc.area.toFixed(4)}`);
        lines.push('stage  pos-reach  pos-pass  neg-reach  neg-pass');
        for (const s of result.stages) {
          lines.push(`${String(s.stage + 1).padStart(5)}  ${String(s.positivesReaching).padStart(9)}  ${rate(s.positivePassRate).padStart(8)}  ${String(s.negativesReaching).padStart(9)}  ${rate(s.negativePassRate).padStart(8)}`);
        }
      } else {
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
        report = { mode: 'detections', model: modelPath, truth: options.truth, ...result, speed };
        lines.push(`images ${result.imageCount}, objects ${result.truthCount}, detections ${result.detectionCount} (${result.truePositives} matched at IoU ≥ ${iou})`);
        lines.push(`average precision (VOC all-point)      ${result.averagePrecision.toFixed(4)}`);
        lines.push(`detection rate at 1 / 10 / 100 FP      ${rate(result.detectionRateAtFalsePositives['1'])} / ${rate(result.detectionRateAtFalsePositives['10'])} / ${rate(result.detectionRateAtFalsePositives['100'])}`);
        lines.push(`log-average miss rate (FPPI 0.01–1)     ${rate(result.logAverageMissRate)}`);
        lines.push(`speed  ${(speed.windowsPerSecond / 1e6).toFixed(2)} M windows/s per thread, ${speed.meanFeaturesPerWindow.toFixed(2)} features/window`);
        lines.push(`rejected by stage  ${speed.rejectedAtStageShare.map((s, k) => `${k + 1}:${rate(s)}`).join(' ')}  flat:${rate(speed.flatShare)}  accepted:${(100 * speed.acceptedShare).toPrecision(2)}%`);
      }
      process.stdout.write(`${lines.join('\n')}\n`);
      if (options.json !== undefined) await writeFileAtomic(options.json, `${JSON.stringify(report, null, 2)}\n`);
    });
}
