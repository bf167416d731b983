import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { relative } from 'node:path';
import pLimit from 'p-limit';
import { RectboostError } from '../errors.js';
import type { GrayImage } from '../image/gray-image.js';
import { decodeGrayImageBytes } from '../io/decode-image.js';

/** Images read from a set of files, with the ones that failed. */
export interface CheckedImages {
  /** Readable images, in file order. */
  readonly images: GrayImage[];
  /** Files of `images`, same order. */
  readonly files: string[];
  /** Files that could not be used, with the reason. */
  readonly bad: Array<{ file: string; reason: string }>;
  /** SHA-256 over every file's path (relative to `root`) and bytes, in sorted path order. */
  readonly contentHash: string;
}

export interface ReadImagesOptions {
  /** Folder that paths in the content hash are relative to. */
  readonly root: string;
  readonly maxPixels?: number;
  /** Files decoded at once (default 4). */
  readonly concurrency?: number;
  readonly onProgress?: (done: number, total: number) => void;
}

/**
 * Reads and decodes every file before any long work starts (DESIGN §5),
 * collecting failures instead of stopping at the first. The content hash lets a
 * model record exactly which data trained it, and lets --resume refuse changed data.
 */
export async function readImagesChecked(files: readonly string[], options: ReadImagesOptions): Promise<CheckedImages> {
  const limit = pLimit(options.concurrency ?? 4);
  const results = new Array<{ image?: GrayImage; digest: string; reason?: string }>(files.length);
  let done = 0;
  await Promise.all(
    files.map((file, i) =>
      limit(async () => {
        let bytes: Buffer;
        try {
          bytes = await readFile(file);
        } catch (error) {
          results[i] = { digest: 'unreadable', reason: `Image ${file} cannot be read (${(error as Error).message}).` };
          return;
        }
        const digest = createHash('sha256').update(relative(options.root, file)).update('\0').update(bytes).digest('hex');
        try {
          const decodeOptions = options.maxPixels === undefined ? {} : { maxPixels: options.maxPixels };
          results[i] = { image: await decodeGrayImageBytes(bytes, file, decodeOptions), digest };
        } catch (error) {
          results[i] = { digest, reason: error instanceof Error ? error.message : String(error) };
        }
        done++;
        options.onProgress?.(done, files.length);
      }),
    ),
  );
  const hash = createHash('sha256');
  const images: GrayImage[] = [];
  const good: string[] = [];
  const bad: Array<{ file: string; reason: string }> = [];
  results.forEach((result, i) => {
    hash.update(result.digest).update('\n');
    if (result.image !== undefined) {
      images.push(result.image);
      good.push(files[i]!);
    } else {
      bad.push({ file: files[i]!, reason: result.reason ?? 'unknown problem' });
    }
  });
  return { images, files: good, bad, contentHash: hash.digest('hex') };
}

/**
 * Throws one `bad-image` error listing the first 20 bad files and the count,
 * unless `skipBad`; with `skipBad` returns the same list for a warning.
 */
export function refuseBadImages(what: string, checked: CheckedImages, skipBad: boolean): string[] {
  if (checked.bad.length === 0) return [];
  const lines = checked.bad.slice(0, 20).map((entry) => `  ${entry.reason}`);
  if (checked.bad.length > 20) lines.push(`  … and ${checked.bad.length - 20} more.`);
  if (skipBad) return lines;
  const total = checked.bad.length + checked.images.length;
  throw new RectboostError(
    'bad-image',
    `${checked.bad.length} of ${total} ${what} cannot be used; fix or remove them, or pass --skip-bad to train without them:\n${lines.join('\n')}`,
  );
}
