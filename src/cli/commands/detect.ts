import { createHash } from 'node:crypto';
import { basename, extname, join } from 'node:path';
import type { Command } from 'commander';
import { readImageList } from '../../data/image-list.js';
import { listImageFilesOfAll } from '../../data/list-images.js';
import { RectboostError } from '../../errors.js';
import { runtimeFileFromDetector } from '../../cascade/runtime-export.js';
import { writeFileAtomic } from '../../io/atomic-write.js';
import { formatDetectionLine } from '../../parallel/detections-file.js';
import { DETECTION_COLOUR, drawBoxes } from '../../io/draw-boxes.js';
import { encodeRgbPng } from '../../io/encode-image.js';
import { detectEntries, type ImageDetections } from '../../parallel/detect-files.js';
import { loadModelFile } from '../../io/model-file.js';
import { openShardOutput, type ShardOutput } from '../../parallel/shard-output.js';
import { parseShard, shardFromEnvironment, WHOLE_LIST } from '../../data/shard.js';
import { formatCount, createProgressLine } from '../progress.js';
import { addScanOptions, parseScanOptions, type ScanOptionText } from '../scan-options.js';

export { DETECTIONS_VERSION } from '../../parallel/detections-file.js';

/** One JSON line of the detections file (with timing; see formatDetectionLine). */
export function detectionLine(result: ImageDetections): string {
  return formatDetectionLine(result);
}

/** An image to scan, with its list line when it came from --list. */
interface InputEntry {
  readonly image: string;
  readonly line?: number;
}

interface DetectOptionText extends ScanOptionText {
  out?: string;
  draw?: string;
  list?: string;
  shard?: string;
  shardDir?: string;
  timing: boolean;
}

/** `rectboost detect MODEL IMAGE_OR_FOLDER...` or `rectboost detect MODEL --list FILE [--shard K/N] [--shard-dir DIR]` */
export function registerDetectCommand(program: Command): void {
  const command = program
    .command('detect')
    .description('find objects in images with a trained (or exported) cascade; one JSON line per image')
    .argument('<model>', 'model JSON from rectboost train, or a runtime export')
    .argument('[images...]', 'image files or folders (searched recursively)')
    .option('--list <file>', 'read image paths from this file instead, one per line ("-": standard input)')
    .option('--shard <K/N>', 'with --list: only lines n with (n-1) mod N = K (default in a Slurm array task: its ID/count)')
    .option('--shard-dir <folder>', 'with --list: append to FOLDER/shard-K-of-N.jsonl, skipping images already written there (resumable)')
    .option('--out <file>', 'write the detections JSON Lines here instead of stdout')
    .option('--draw <folder>', 'also write each image as PNG with its detections outlined')
    .option('--no-timing', 'leave "milliseconds" out of each line, so the output is the same byte for byte on every run');
  addScanOptions(command)
    .addHelpText(
      'after',
      '\nExamples:\n  rectboost detect model.json scenes/ --out detections.jsonl\n  rectboost detect model.json photo.jpg --merge mean --min-support 3 --draw annotated/\n' +
        '  find archive -name "*.jpg" | rectboost detect model.json --list - --no-timing --out detections.jsonl\n' +
        '  rectboost detect model.json --list images.txt --shard 3/8 --shard-dir parts/ --no-timing   (then: rectboost join parts/ --out detections.jsonl)\n',
    )
    .action(async (modelPath: string, paths: string[], options: DetectOptionText) => {
      const parsed = parseScanOptions(options);
      const listed = options.list !== undefined;
      if (listed === paths.length > 0) throw new RectboostError('invalid-option', 'Give image files or folders, or --list FILE, but not both (and not neither).');
      if (!listed && (options.shard !== undefined || options.shardDir !== undefined)) throw new RectboostError('invalid-option', '--shard and --shard-dir work on an image list; add --list FILE.');
      if (options.shardDir !== undefined && options.out !== undefined) throw new RectboostError('invalid-option', '--shard-dir writes the shard file itself; drop --out (join the shards with rectboost join).');
      const shard = !listed ? WHOLE_LIST : options.shard !== undefined ? parseShard('--shard', options.shard) : (shardFromEnvironment(process.env) ?? WHOLE_LIST);
      const { detector } = await loadModelFile(modelPath, { require: 'any-cascade' });
      const files = listed ? [] : await listImageFilesOfAll(paths);
      if (!listed && files.length === 0) throw new RectboostError('bad-data', `No image files (PNG, JPEG, TIFF, WebP) under ${paths.join(', ')}.`);
      // What must not change between the shards of one folder: a full model and its runtime export count as one cascade.
      const settings = {
        cascadeSha256: createHash('sha256').update(JSON.stringify(runtimeFileFromDetector(detector))).digest('hex'),
        scan: parsed.scan,
        merge: parsed.merge,
        timing: options.timing,
        list: options.list,
        shardCount: shard.count,
      };
      const output: ShardOutput | undefined = options.shardDir === undefined ? undefined : await openShardOutput(options.shardDir, shard, settings);
      const listEntries = options.list === undefined ? undefined : readImageList(options.list, shard);
      const entries: Iterable<InputEntry> | AsyncIterable<InputEntry> = listEntries === undefined ? files.map((image): InputEntry => ({ image })) : output === undefined ? listEntries : output.remaining(listEntries);
      const lines: string[] = [];
      const failures: string[] = [];
      const drawnNames = new Set<string>();
      const tally = { images: 0, windowsScanned: 0, detections: 0 };
      const started = performance.now();
      const progress = createProgressLine('detect: images', files.length, options.quiet === true);
      try {
        for await (const { entry, outcome } of detectEntries(detector, entries, {
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
          tally.images += 1;
          tally.windowsScanned += outcome.result.windowsScanned;
          tally.detections += outcome.result.detections.length;
          const line = formatDetectionLine(outcome.result, { timing: options.timing, ...(entry.line === undefined ? {} : { line: entry.line }) });
          if (output !== undefined && entry.line !== undefined) await output.append(entry.line, line);
          else if (options.out === undefined) process.stdout.write(`${line}\n`);
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
      } catch (error) {
        await output?.close();
        throw error;
      }
      progress.finish();
      const seconds = (performance.now() - started) / 1000;
      await output?.finish({ ...tally, failed: failures, seconds: Math.round(seconds * 1000) / 1000 });
      if (options.out !== undefined) await writeFileAtomic(options.out, lines.length > 0 ? `${lines.join('\n')}\n` : '');
      if (options.quiet !== true) process.stderr.write(`${summaryLine(tally, failures.length, output?.written.size, seconds)}\n`);
      if (failures.length > 0) {
        const total = tally.images + failures.length;
        throw new RectboostError(
          'bad-image',
          `${failures.length} of ${total} images could not be read and were skipped (listed above); the other ${tally.images} were processed.`,
        );
      }
    });
}

/** `detect: 250 images in 9.8 s (…): 25.5 images/s, 2.61M windows/s, 40.2 detections/s` */
function summaryLine(tally: { images: number; windowsScanned: number; detections: number }, failed: number, writtenAfter: number | undefined, seconds: number): string {
  const notes = [
    ...(writtenAfter === undefined || writtenAfter === tally.images ? [] : [`${writtenAfter - tally.images} skipped as already written`]),
    ...(failed > 0 ? [`${failed} unreadable`] : []),
  ];
  const rate = (count: number): string => formatCount(seconds > 0 ? count / seconds : 0);
  return (
    `detect: ${tally.images} images, ${formatCount(tally.windowsScanned)} windows, ${tally.detections} detections in ${seconds.toFixed(1)} s` +
    `${notes.length > 0 ? ` (${notes.join(', ')})` : ''}: ` +
    `${rate(tally.images)} images/s, ${rate(tally.windowsScanned)} windows/s, ${rate(tally.detections)} detections/s`
  );
}
