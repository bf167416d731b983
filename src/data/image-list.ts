import { createReadStream } from 'node:fs';
import { createInterface } from 'node:readline';
import type { Readable } from 'node:stream';
import { RectboostError } from '../errors.js';
import { lineInShard, WHOLE_LIST, type Shard } from '../parallel/shard.js';

/** One image of an image list: its 1-based line number and the path as written. */
export interface ImageListEntry {
  readonly line: number;
  readonly image: string;
}

/**
 * The entries of an image list (one path per line) that belong to `shard`.
 * Lines count from 1 and every line counts, empty or not, so a line number names
 * the same entry in every shard and in a single run. A trailing carriage return
 * and surrounding blanks are dropped; a line left empty is no entry. A path that
 * appears on several lines is several entries (the list is the job, line by line).
 * @example [...imageListEntries(['a.png', '', 'b.png'])] // [{line: 1, image: 'a.png'}, {line: 3, image: 'b.png'}]
 */
export function* imageListEntries(lines: Iterable<string>, shard: Shard = WHOLE_LIST): Generator<ImageListEntry> {
  let line = 0;
  for (const text of lines) {
    line += 1;
    const entry = entryOfLine(line, text, shard);
    if (entry !== undefined) yield entry;
  }
}

function entryOfLine(line: number, text: string, shard: Shard): ImageListEntry | undefined {
  if (!lineInShard(line, shard)) return undefined;
  const image = text.trim();
  return image === '' ? undefined : { line, image };
}

/**
 * Streams the entries of an image list file, or of standard input when `source`
 * is `-`, that belong to `shard` (rules of imageListEntries). Paths are returned
 * as written; relative ones are relative to the working directory.
 * @throws RectboostError `bad-data` when the file cannot be read.
 */
export async function* readImageList(source: string, shard: Shard = WHOLE_LIST, stdin: Readable = process.stdin): AsyncGenerator<ImageListEntry> {
  const input = source === '-' ? stdin : createReadStream(source);
  const lines = createInterface({ input, crlfDelay: Infinity });
  let line = 0;
  try {
    for await (const text of lines) {
      line += 1;
      const entry = entryOfLine(line, text, shard);
      if (entry !== undefined) yield entry;
    }
  } catch (error) {
    const where = source === '-' ? 'standard input' : source;
    throw new RectboostError('bad-data', `Image list ${where} cannot be read (${(error as NodeJS.ErrnoException).code ?? 'unknown error'}); check the path.`, { cause: error });
  } finally {
    lines.close();
  }
}
