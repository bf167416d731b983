import { basename, extname, join } from 'node:path';
import type { Command } from 'commander';
import { listImageFilesOfAll } from '../../data/list-images.js';
import { RectboostError } from '../../errors.js';
import { writeFileAtomic } from '../../io/atomic-write.js';
import { DETECTION_COLOUR, drawBoxes } from '../../io/draw-boxes.js';
import { encodeRgbPng } from '../../io/encode-image.js';
import { detectFiles, type ImageDetections } from '../../parallel/detect-files.js';
import { loadModelFile } from '../../io/model-file.js';
import { createProgressLine } from '../progress.js';
import { addScanOptions, parseScanOptions, type ScanOptionText } from '../scan-options.js';

/** Version of the detections JSON Lines layout (DESIGN §3). */
export const DETECTIONS_VERSION = 1;

/** One JSON line of the detections file. */
export function detectionLine(result: ImageDetections): string {
  return JSON.stringify({
    version: DETECTIONS_VERSION,
    image: result.image,
    width: result.width,
    height: result.height,
    detections: result.detections.map((d) => ({ box: d.box, score: d.score, support: d.support })),
    windowsScanned: result.windowsScanned,
    milliseconds: Math.round(result.milliseconds * 100) / 100,
  });
}

/** `rectboost detect MODEL IMAGE_OR_FOLDER...` */
export function registerDetectCommand(program: Command): void {
  const command = program
    .command('detect')
    .description('find objects in images with a trained (or exported) cascade; one JSON line per image')
    .argument('<model>', 'model JSON from rectboost train, or a runtime export')
    .argument('<images...>', 'image files or folders (searched recursively)')
    .option('--out <file>', 'write the detections JSON Lines here instead of stdout')
    .option('--draw <folder>', 'also write each image as PNG with its detections outlined');
  addScanOptions(command)
    .addHelpText('after', '\nExamples:\n  rectboost detect model.json scenes/ --out detections.jsonl\n  rectboost detect model.json photo.jpg --merge mean --min-support 3 --draw annotated/\n')
    .action(async (modelPath: string, paths: string[], options: ScanOptionText & { out?: string; draw?: string }) => {
      const parsed = parseScanOptions(options);
      const { detector } = await loadModelFile(modelPath, { require: 'any-cascade' });
      const files = await listImageFilesOfAll(paths);
      if (files.length === 0) throw new RectboostError('bad-data', `No image files (PNG, JPEG, TIFF, WebP) under ${paths.join(', ')}.`);
      const lines: string[] = [];
      const failures: string[] = [];
      const drawnNames = new Set<string>();
      const progress = createProgressLine('detect: images', files.length, options.quiet === true);
      for await (const outcome of detectFiles(detector, files, {
        scan: parsed.scan,
        merge: parsed.merge,
        concurrency: parsed.concurrency,
        ...(parsed.workers === undefined ? {} : { workers: parsed.workers }),
      })) {
        progress.advance();
        if (outcome.kind === 'failed') {
          progress.finish();
          const message = outcome.error instanceof Error ? outcome.error.message : String(outcome.error);
          failures.push(message);
          process.stderr.write(`rectboost: skipped: ${message}\n`);
          continue;
        }
        const line = detectionLine(outcome.result);
        if (options.out === undefined) process.stdout.write(`${line}\n`);
        else lines.push(line);
        if (options.draw !== undefined) {
          const stem = basename(outcome.result.image, extname(outcome.result.image));
          let name = `${stem}.png`;
          for (let k = 2; drawnNames.has(name); k++) name = `${stem}-${k}.png`;
          drawnNames.add(name);
          const picture = drawBoxes(outcome.pixels, [{ boxes: outcome.result.detections.map((d) => d.box), colour: DETECTION_COLOUR }]);
          await writeFileAtomic(join(options.draw, name), await encodeRgbPng(picture));
        }
      }
      progress.finish();
      if (options.out !== undefined) await writeFileAtomic(options.out, lines.length > 0 ? `${lines.join('\n')}\n` : '');
      if (failures.length > 0) {
        throw new RectboostError(
          'bad-image',
          `${failures.length} of ${files.length} images could not be read and were skipped (listed above); the other ${files.length - failures.length} were processed.`,
        );
      }
    });
}
