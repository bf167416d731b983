import type { Command } from 'commander';
import { writeFileAtomic } from '../../io/atomic-write.js';
import { weakClassifierDepth } from '../../cascade/cascade-model.js';
import { drawModelFeatureSheet } from '../../io/draw-features.js';
import { encodeRgbPng } from '../../io/encode-image.js';
import { loadModelFile } from '../../io/model-file.js';
import { parseInteger } from '../parse-options.js';

function percent(value: number | undefined): string {
  return value === undefined ? '—' : `${(100 * value).toFixed(2)}%`;
}

/** `rectboost inspect MODEL [--draw FILE]` */
export function registerInspectCommand(program: Command): void {
  program
    .command('inspect')
    .description('show a per-stage table of a model and optionally draw its first features')
    .argument('<model>', 'model JSON from rectboost train')
    .option('--draw <file>', 'write a PNG of the first features of the first stages')
    .option('--stages <count>', 'stages to draw', '3')
    .option('--features <count>', 'weak classifiers to draw per stage', '5')
    .option('--zoom <factor>', 'enlargement of the drawn window', '8')
    .addHelpText('after', '\nExamples:\n  rectboost inspect model.json\n  rectboost inspect model.json --draw features.png --stages 2 --features 4\n')
    .action(async (modelPath: string, options: { draw?: string; stages: string; features: string; zoom: string }) => {
      const stagesToDraw = parseInteger('--stages', options.stages, 1, 100);
      const featuresToDraw = parseInteger('--features', options.features, 1, 100);
      const zoom = parseInteger('--zoom', options.zoom, 1, 32);
      const { model } = await loadModelFile(modelPath, { require: 'full-model', neededBy: 'rectboost inspect' });
      const out: string[] = [];
      out.push(`${modelPath}: ${model.window.width}×${model.window.height} window, ${model.featureSet} features, ${model.stages.length} stages`);
      out.push('stage  weak  threshold     detection  false-pos  cumulative-fp');
      let cumulative = 1;
      model.stages.forEach((stage, k) => {
        const rates = stage.training;
        if (rates) cumulative *= rates.falsePositiveRate;
        out.push(
          `${String(k + 1).padStart(5)}  ${String(stage.weakClassifiers.length).padStart(4)}  ${stage.threshold.toPrecision(6).padStart(11)}  ` +
            `${percent(rates?.detectionRate).padStart(10)}  ${percent(rates?.falsePositiveRate).padStart(9)}  ${(rates ? cumulative.toExponential(2) : '—').padStart(13)}`,
        );
      });
      const total = model.stages.reduce((n, stage) => n + stage.weakClassifiers.length, 0);
      out.push(`total weak classifiers: ${total}`);
      const depths = model.stages.flatMap((stage) => stage.weakClassifiers.map(weakClassifierDepth));
      const trees = depths.filter((depth) => depth > 1).length;
      if (trees > 0) out.push(`weak classifiers: ${trees} decision trees (depth ≤ ${Math.max(...depths)}), ${total - trees} stumps`);
      process.stdout.write(`${out.join('\n')}\n`);
      if (options.draw !== undefined) {
        const sheet = drawModelFeatureSheet(model, stagesToDraw, featuresToDraw, zoom);
        await writeFileAtomic(options.draw, await encodeRgbPng(sheet));
        process.stderr.write(`Wrote ${options.draw} (${sheet.width}×${sheet.height}, backdrop: ${model.meanPositive ? 'mean positive' : 'gray window'}).\n`);
      }
    });
}
