import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import type { Command } from 'commander';
import { cWorkBytes, exportCDetector } from '../../cascade/c-export.js';
import { runtimeCascadeFromValue, runtimeFileFromDetector } from '../../cascade/runtime-export.js';
import { writeFileAtomic } from '../../io/atomic-write.js';
import { loadModelFile } from '../../io/model-file.js';
import { parseInteger, parseWindowSize } from '../parse-options.js';

/** Where the shared C detector code lives in the package (runtime-c/ beside dist/). */
const C_TEMPLATES = new URL('../../../runtime-c/', import.meta.url);

/** The files `export --c DIR` writes. */
export const C_EXPORT_FILES = { header: 'rectboost_detector.h', source: 'rectboost_detector.c', example: 'detect_pgm.c' } as const;

/** `rectboost export MODEL --out FILE [--c DIR]` */
export function registerExportCommand(program: Command): void {
  program
    .command('export')
    .description('write the runtime-only cascade JSON (weighted rectangles, no training history), and optionally a C99 detector')
    .argument('<model>', 'model JSON from rectboost train (or a runtime export)')
    .option('--out <file>', 'where to write the runtime cascade JSON')
    .option('--c <folder>', `also write a self-contained C99 detector there (${Object.values(C_EXPORT_FILES).join(', ')})`)
    .option('--c-image <WxH>', 'image size for the work-memory figure printed with --c', '640x480')
    .option('--c-hits <count>', 'raw-hit capacity for the work-memory figure printed with --c', '16384')
    .addHelpText(
      'after',
      '\nThe JSON layout is documented by schema/runtime-cascade.schema.json. The C files build with\n' +
        '  cc -std=c99 -O2 -ffp-contract=off detect_pgm.c rectboost_detector.c -lm          (float build)\n' +
        '  cc -std=c99 -O2 -DRBD_INTEGER detect_pgm.c rectboost_detector.c                   (integer build)\n' +
        '\nExamples:\n  rectboost export model.json --out cascade.json\n  rectboost export model.json --c detector/ --c-image 320x240\n  rectboost detect cascade.json photo.jpg\n',
    )
    .action(async (modelPath: string, options: { out?: string; c?: string; cImage: string; cHits: string }) => {
      const image = parseWindowSize('--c-image', options.cImage, 1, 1 << 16);
      const hits = parseInteger('--c-hits', options.cHits, 1, 1 << 28);
      const { detector } = await loadModelFile(modelPath, { require: 'any-cascade' });
      const classifiers = detector.stages.reduce((n, stage) => n + stage.weakClassifiers.length, 0);
      const summary = `${detector.stages.length} stages, ${classifiers} weak classifiers, ${detector.windowWidth}×${detector.windowHeight} window`;
      if (options.out === undefined && options.c === undefined) {
        process.stderr.write('rectboost export: nothing to write; pass --out FILE, --c FOLDER or both.\n');
        process.exitCode = 2;
        return;
      }
      if (options.out !== undefined) {
        const file = runtimeFileFromDetector(detector);
        const text = `${JSON.stringify(file)}\n`;
        // Validate what we are about to write with the same checks a reader applies.
        runtimeCascadeFromValue(JSON.parse(text), options.out);
        await writeFileAtomic(options.out, text);
        process.stderr.write(`Wrote ${options.out}: ${summary}.\n`);
      }
      if (options.c !== undefined) {
        const templates = {
          header: await readFile(new URL('rectboost_detector.h.in', C_TEMPLATES), 'utf8'),
          core: await readFile(new URL('rectboost_detector_core.c', C_TEMPLATES), 'utf8'),
        };
        const exported = exportCDetector(detector, templates, modelPath);
        await writeFileAtomic(join(options.c, C_EXPORT_FILES.header), exported.header);
        await writeFileAtomic(join(options.c, C_EXPORT_FILES.source), exported.source);
        await writeFileAtomic(join(options.c, C_EXPORT_FILES.example), await readFile(new URL(C_EXPORT_FILES.example, C_TEMPLATES), 'utf8'));
        const work = (build: 'float' | 'integer'): number => cWorkBytes(detector, build, image.width, image.height, hits);
        process.stderr.write(
          `Wrote ${options.c}: C99 detector for ${summary}.\n` +
            `  tables (ROM): ${exported.tableBytes.float} bytes (float build), ${exported.tableBytes.integer} bytes (integer build, values with ${exported.valueBits} fractional bits)\n` +
            `  work memory (RAM) for ${image.width}×${image.height} and ${hits} raw hits: ${work('float')} bytes (float build), ${work('integer')} bytes (integer build)\n`,
        );
      }
    });
}
