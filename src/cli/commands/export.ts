import type { Command } from 'commander';
import { runtimeCascadeFromValue, runtimeFileFromDetector } from '../../cascade/runtime-export.js';
import { writeFileAtomic } from '../../io/atomic-write.js';
import { loadModelFile } from '../../io/model-file.js';

/** `rectboost export MODEL --out FILE` */
export function registerExportCommand(program: Command): void {
  program
    .command('export')
    .description('write the runtime-only cascade JSON (weighted rectangles, no training history)')
    .argument('<model>', 'model JSON from rectboost train')
    .requiredOption('--out <file>', 'where to write the runtime cascade')
    .addHelpText('after', '\nThe layout is documented by schema/runtime-cascade.schema.json.\n\nExamples:\n  rectboost export model.json --out cascade.json\n  rectboost detect cascade.json photo.jpg\n')
    .action(async (modelPath: string, options: { out: string }) => {
      const { detector } = await loadModelFile(modelPath, { require: 'any-cascade' });
      const file = runtimeFileFromDetector(detector);
      const text = `${JSON.stringify(file)}\n`;
      // Validate what we are about to write with the same checks a reader applies.
      runtimeCascadeFromValue(JSON.parse(text), options.out);
      await writeFileAtomic(options.out, text);
      const classifiers = detector.stages.reduce((n, stage) => n + stage.weakClassifiers.length, 0);
      process.stderr.write(`Wrote ${options.out}: ${detector.stages.length} stages, ${classifiers} weak classifiers, ${detector.windowWidth}×${detector.windowHeight} window.\n`);
    });
}
