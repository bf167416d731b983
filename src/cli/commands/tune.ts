import type { Command } from 'commander';
import { backgroundPassRates, retuneCascade } from '../../cascade/retune.js';
import { loadBackgroundImages } from '../../data/backgrounds.js';
import { loadPositiveWindows } from '../../data/positives.js';
import { detectorCascadeFromModel } from '../../detect/detector-cascade.js';
import { RectboostError } from '../../errors.js';
import { packWindowSamples } from '../../features/window-samples.js';
import { saveCascadeModel } from '../../io/model-file.js';
import { createScanPool } from '../../parallel/scan-pool.js';
import { loadModelFile } from '../../io/model-file.js';
import { parseInteger, parseNumber } from '../parse-options.js';

const rate = (value: number): string => `${(100 * value).toFixed(2)}%`;

/** `rectboost tune MODEL --positives P --backgrounds B [--stage-detection R] [--final-offset X] --out FILE` */
export function registerTuneCommand(program: Command): void {
  program
    .command('tune')
    .description('reset stage thresholds for new targets without retraining the weak classifiers')
    .argument('<model>', 'model JSON from rectboost train')
    .requiredOption('--positives <path>', 'folder of object patches (or annotation file)')
    .requiredOption('--backgrounds <folder>', 'folder of images without the object (false-positive rates)')
    .requiredOption('--out <file>', 'where to write the retuned model')
    .option('--stage-detection <rate>', 'detection rate each stage keeps on the positives reaching it, in (0, 1]')
    .option('--final-offset <margin>', 'added to the last stage threshold (positive = stricter)')
    .option('--scale-step <ratio>', 'scale step of the background scan', '1.25')
    .option('--shift <pixels>', 'shift of the background scan', '2')
    .option('--workers <count>', 'scan threads (default: all cores; 0 = no threads)')
    .addHelpText('after', '\nExamples:\n  rectboost tune model.json --positives patches/ --backgrounds panels/ --stage-detection 0.99 --out tuned.json\n  rectboost tune model.json --positives patches/ --backgrounds panels/ --final-offset 0.5 --out strict.json\n')
    .action(async (modelPath: string, options: { positives: string; backgrounds: string; out: string; stageDetection?: string; finalOffset?: string; scaleStep: string; shift: string; workers?: string }) => {
      if (options.stageDetection === undefined && options.finalOffset === undefined) {
        throw new RectboostError('invalid-option', 'tune needs --stage-detection RATE, --final-offset MARGIN, or both.');
      }
      const stageDetectionRate = options.stageDetection === undefined ? undefined : parseNumber('--stage-detection', options.stageDetection, 1e-9, 1);
      const finalStageOffset = options.finalOffset === undefined ? undefined : parseNumber('--final-offset', options.finalOffset, -1e12, 1e12);
      const scan = { scaleStep: parseNumber('--scale-step', options.scaleStep, 1.0001, 4), shift: parseNumber('--shift', options.shift, 0.01, 64) };
      const workers = options.workers === undefined ? undefined : parseInteger('--workers', options.workers, 0, 256);
      const { model } = await loadModelFile(modelPath, { require: 'full-model', neededBy: 'rectboost tune' });
      const { windows } = await loadPositiveWindows(options.positives, { windowWidth: model.window.width, windowHeight: model.window.height, mirror: false, skipBad: false });
      const samples = packWindowSamples(windows, model.window.width, model.window.height, undefined, { rotated: model.featureSet === 'extended' });
      const result = retuneCascade(model, samples, {
        ...(stageDetectionRate === undefined ? {} : { stageDetectionRate }),
        ...(finalStageOffset === undefined ? {} : { finalStageOffset }),
      });
      const { images: backgrounds } = await loadBackgroundImages(options.backgrounds, { windowWidth: model.window.width, windowHeight: model.window.height, skipBad: false });
      const pool = createScanPool(detectorCascadeFromModel(result.model), workers);
      let rates;
      try {
        rates = backgroundPassRates((await Promise.all(backgrounds.map((image) => pool.scan(image, scan)))).map((r) => r.statistics));
      } finally {
        await pool.close();
      }
      await saveCascadeModel(options.out, result.model);
      const lines = [`${samples.count} positives, ${rates.windows} background windows from ${backgrounds.length} images`, 'stage  old-threshold  new-threshold  detection  false-pos'];
      result.stages.forEach((stage, k) => {
        lines.push(`${String(k + 1).padStart(5)}  ${stage.previousThreshold.toPrecision(6).padStart(13)}  ${stage.threshold.toPrecision(6).padStart(13)}  ${rate(stage.detectionRate).padStart(9)}  ${rate(rates.stageFalsePositiveRates[k] ?? 0).padStart(9)}`);
      });
      lines.push(`overall: detection ${rate(result.overallDetectionRate)}, false positives ${rates.overallFalsePositiveRate.toExponential(3)} per window; wrote ${options.out}`);
      process.stdout.write(`${lines.join('\n')}\n`);
    });
}
