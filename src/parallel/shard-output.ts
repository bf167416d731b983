import { createReadStream } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { link, mkdir, open, readFile, rm, stat, writeFile, type FileHandle } from 'node:fs/promises';
import { join } from 'node:path';
import { createInterface } from 'node:readline';
import { RectboostError } from '../errors.js';
import { writeFileAtomic, writeLinesAtomic } from '../io/atomic-write.js';
import { listLineOfDetectionLine } from '../io/detections-file.js';
import { shardFileStem, type Shard } from './shard.js';

/** What one run of a shard did, as recorded in its `.done.json` marker. */
export interface ShardRunFigures {
  /** Images detected in this run (not counting those skipped as already written). */
  readonly images: number;
  /** Images of this shard that could not be read, by path. */
  readonly failed: readonly string[];
  readonly windowsScanned: number;
  readonly detections: number;
  readonly seconds: number;
}

/** Content of a shard's `.done.json` marker. */
export interface ShardDoneMarker extends ShardRunFigures {
  readonly shard: number;
  readonly shardCount: number;
  /** Lines in the shard's detections file when it was finished (all runs). */
  readonly linesWritten: number;
  /** Images that an earlier, interrupted run had already written. */
  readonly resumedAfter: number;
}

/**
 * The resumable detections file of one shard, `FOLDER/shard-K-of-N.jsonl`.
 *
 * Each detections line is appended with one write to a file opened for
 * appending, so a killed run leaves whole lines behind (at worst a torn last
 * line after a machine crash, which opening cuts off). Opening reads the line
 * numbers already written so a re-run skips them; the shard is marked finished
 * only by `finish`, which writes `shard-K-of-N.done.json` (atomically, after
 * putting the lines in list order if a re-run appended some out of order).
 * Do not run the same shard twice at the same time: both would append.
 */
export interface ShardOutput {
  readonly path: string;
  /** List line numbers already in the file when it was opened. */
  readonly written: ReadonlySet<number>;
  /** The entries of `entries` whose line is not yet written. */
  remaining<E extends { readonly line: number }>(entries: Iterable<E> | AsyncIterable<E>): AsyncGenerator<E>;
  /** Appends the detections line (no newline) of list line `line`. */
  append(line: number, text: string): Promise<void>;
  /** Closes the file, sorts it by list line if needed and writes the done marker. */
  finish(figures: ShardRunFigures): Promise<ShardDoneMarker>;
  /** Closes the file without marking the shard finished (after an error). */
  close(): Promise<void>;
}

/** Paths of a shard's detections file and done marker in `folder`. */
export function shardPaths(folder: string, shard: Shard): { readonly lines: string; readonly done: string } {
  const stem = shardFileStem(shard);
  return { lines: join(folder, `${stem}.jsonl`), done: join(folder, `${stem}.done.json`) };
}

/**
 * Opens (creating folder and file if needed) the detections file of `shard` in
 * `folder`, removes its done marker (this run may not finish) and cuts off a torn
 * last line. `settings` (any JSON value: cascade hash, options, list, shard count)
 * is recorded in `folder/run.json` by the first shard that starts; every later
 * shard must bring the same, so one folder never mixes the results of two setups.
 * @throws RectboostError `bad-data` when `settings` differ from run.json, or the file holds a line
 *   that is not a detections line with a list line number, or a line twice.
 */
export async function openShardOutput(folder: string, shard: Shard, settings: unknown = { shardCount: shard.count }): Promise<ShardOutput> {
  const paths = shardPaths(folder, shard);
  await mkdir(folder, { recursive: true });
  await claimRunSettings(folder, settings);
  await rm(paths.done, { force: true });
  await cutTornTail(paths.lines);
  const written = new Set<number>();
  let last = 0;
  let ordered = true;
  for await (const { text, number } of fileLines(paths.lines)) {
    const line = listLineOfDetectionLine(text, `Line ${number} of ${paths.lines}`);
    if (written.has(line)) throw duplicateLine(paths.lines, line);
    written.add(line);
    ordered &&= line > last;
    last = line;
  }
  const resumedAfter = written.size;
  let appended = 0;
  let handle: FileHandle | undefined = await open(paths.lines, 'a');
  const closeFile = async (): Promise<void> => {
    const open = handle;
    handle = undefined;
    await open?.close();
  };
  return {
    path: paths.lines,
    written,
    async *remaining(entries) {
      for await (const entry of entries) if (!written.has(entry.line)) yield entry;
    },
    async append(line, text) {
      if (handle === undefined) throw new Error('shard output already closed');
      if (written.has(line)) throw duplicateLine(paths.lines, line);
      written.add(line);
      ordered &&= line > last;
      last = line;
      appended += 1;
      await handle.appendFile(`${text}\n`);
    },
    async finish(figures) {
      await handle?.sync();
      await closeFile();
      if (!ordered) await sortByListLine(paths.lines);
      const marker: ShardDoneMarker = {
        shard: shard.index,
        shardCount: shard.count,
        linesWritten: resumedAfter + appended,
        resumedAfter,
        ...figures,
      };
      await writeFileAtomic(paths.done, `${JSON.stringify(marker, null, 2)}\n`);
      return marker;
    },
    close: closeFile,
  };
}

/**
 * Writes folder/run.json unless it exists (a hard link of a finished temporary file,
 * so shards starting at once never see it half-written), then checks it matches.
 */
async function claimRunSettings(folder: string, settings: unknown): Promise<void> {
  const path = join(folder, 'run.json');
  const text = `${JSON.stringify(settings, null, 2)}\n`;
  const temporary = join(folder, `.rectboost-tmp-run-${randomBytes(4).toString('hex')}`);
  await writeFile(temporary, text);
  try {
    await link(temporary, path);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
  } finally {
    await rm(temporary, { force: true });
  }
  const recorded = await readFile(path, 'utf8');
  if (recorded !== text) {
    throw new RectboostError(
      'bad-data',
      `${path} records other settings (cascade, scan or merge options, list or shard count) than this run: ${JSON.stringify(settings)}; ` +
        'use a new --shard-dir for a new setup, or delete that folder to start over.',
    );
  }
}

function duplicateLine(path: string, line: number): RectboostError {
  return new RectboostError('bad-data', `${path} holds list line ${line} twice; was the same shard run twice at once? Delete the file and run that shard again.`);
}

/** Lines of a text file with their 1-based numbers; none when the file does not exist. */
export async function* fileLines(path: string): AsyncGenerator<{ readonly text: string; readonly number: number }> {
  try {
    await stat(path);
  } catch {
    return;
  }
  const lines = createInterface({ input: createReadStream(path), crlfDelay: Infinity });
  let number = 0;
  for await (const text of lines) {
    number += 1;
    yield { text, number };
  }
}

/** Truncates a file after its last newline (a line cut short by a crash is dropped). */
async function cutTornTail(path: string): Promise<void> {
  let handle: FileHandle;
  try {
    handle = await open(path, 'r+');
  } catch {
    return;
  }
  try {
    const { size } = await handle.stat();
    const chunk = Buffer.alloc(64 * 1024);
    let end = size;
    while (end > 0) {
      const start = Math.max(0, end - chunk.length);
      const { bytesRead } = await handle.read(chunk, 0, end - start, start);
      const newline = chunk.subarray(0, bytesRead).lastIndexOf(0x0a);
      if (newline >= 0) {
        end = start + newline + 1;
        break;
      }
      end = start;
    }
    if (end < size) await handle.truncate(end);
  } finally {
    await handle.close();
  }
}

/** Rewrites a shard file in list-line order (a re-run appended lines that failed before). */
async function sortByListLine(path: string): Promise<void> {
  const text = await readFile(path, 'utf8');
  const lines = text.split('\n').filter((l) => l !== '');
  const keyed = lines.map((l, k) => ({ key: listLineOfDetectionLine(l, `Line ${k + 1} of ${path}`), l }));
  keyed.sort((a, b) => a.key - b.key);
  await writeLinesAtomic(path, keyed.map((k) => k.l));
}
