import type { Command } from 'commander';
import pLimit from 'p-limit';
import { listImageFilesOfAll } from '../../data/list-images.js';
import { RectboostError } from '../../errors.js';
import { decodeGrayImageFile } from '../../io/decode-image.js';
import { parseInteger } from '../parse-options.js';

/** `rectboost check PATH...`: decode every image and list the ones that fail. */
export function registerCheckCommand(program: Command): void {
  program
    .command('check')
    .description('decode every image under the given files or folders and report the ones that cannot be used')
    .argument('<paths...>', 'image files or folders')
    .option('--max-pixels <count>', 'refuse images with more pixels than this', String(2 ** 26))
    .addHelpText('after', '\nExamples:\n  rectboost check demo-patches/positives demo-patches/backgrounds\n  rectboost check photo.jpg --max-pixels 1000000\n')
    .action(async (paths: string[], options: { maxPixels: string }) => {
      const maxPixels = parseInteger('--max-pixels', options.maxPixels, 1, 2 ** 26);
      const files = await listImageFilesOfAll(paths);
      if (files.length === 0) throw new RectboostError('bad-data', `No image files (PNG, JPEG, TIFF, WebP) under ${paths.join(', ')}.`);
      const limit = pLimit(4);
      const problems: string[] = [];
      let pixels = 0;
      await Promise.all(
        files.map((file) =>
          limit(async () => {
            try {
              const image = await decodeGrayImageFile(file, { maxPixels });
              pixels += image.width * image.height;
            } catch (error) {
              problems.push(error instanceof Error ? error.message : String(error));
            }
          }),
        ),
      );
      problems.sort();
      process.stdout.write(`${files.length - problems.length} of ${files.length} images readable (${pixels} pixels).\n`);
      if (problems.length > 0) {
        for (const problem of problems.slice(0, 20)) process.stderr.write(`  ${problem}\n`);
        if (problems.length > 20) process.stderr.write(`  … and ${problems.length - 20} more.\n`);
        throw new RectboostError(
          'bad-image',
          problems.length === 1 ? problems[0]! : `${problems.length} of ${files.length} images cannot be used (listed above).`,
        );
      }
    });
}
