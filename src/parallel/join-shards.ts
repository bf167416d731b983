import { readdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { RectboostError } from '../errors.js';
import { writeLinesAtomic } from '../io/atomic-write.js';
import { listLineOfDetectionLine } from '../io/detections-file.js';
import { mergeAscending } from './ordered-merge.js';
import { fileLines, shardPaths, type ShardDoneMarker } from './shard-output.js';
import { parseShardFileStem, shardOfLine, type Shard } from './shard.js';

/** What joinShards wrote. */
export interface JoinSummary {
  readonly shardCount: number;
  readonly lines: number;
  /** Images that could not be read, summed over the shards' done markers. */
  readonly failed: number;
}

/**
 * Joins the finished shards in `folder` (written by `detect --list --shard-dir`)
 * into one detections file at `out`, in list order: byte for byte what one
 * process over the whole list writes with the same options. The shards are
 * streamed (a k-way merge on the list line numbers), and `out` is written
 * atomically.
 * @throws RectboostError `bad-data` when the folder holds no shards, shards of
 *   different splits, a missing or unfinished shard (they are named), a line in the
 *   wrong shard, or one list line twice.
 */
export async function joinShards(folder: string, out: string): Promise<JoinSummary> {
  let names: string[];
  try {
    names = await readdir(folder);
  } catch (error) {
    throw new RectboostError('bad-data', `Shard folder ${folder} cannot be read (${(error as NodeJS.ErrnoException).code ?? 'unknown error'}); check the path.`, { cause: error });
  }
  const shards = names.flatMap((name) => {
    const shard = name.endsWith('.jsonl') ? parseShardFileStem(name.slice(0, -'.jsonl'.length)) : undefined;
    return shard === undefined ? [] : [shard];
  });
  const counts = [...new Set(shards.map((s) => s.count))].sort((a, b) => a - b);
  if (counts.length === 0) throw new RectboostError('bad-data', `${folder} holds no shard files (shard-K-of-N.jsonl); run detect --list … --shard-dir ${folder} first.`);
  if (counts.length > 1) {
    throw new RectboostError('bad-data', `${folder} mixes shards of different splits (into ${counts.join(', ')} parts); keep one split per folder.`);
  }
  const count = counts[0]!;
  const markers = await Promise.all(Array.from({ length: count }, (_, index) => readDoneMarker(folder, { index, count })));
  const unfinished = markers.flatMap((marker, index) => (marker === undefined ? [index] : []));
  if (unfinished.length > 0) {
    const shown = unfinished.slice(0, 20).join(',');
    throw new RectboostError(
      'bad-data',
      `${unfinished.length} of ${count} shards in ${folder} are missing or unfinished (${shown}${unfinished.length > 20 ? ',…' : ''}); ` +
        `run them again (e.g. sbatch --array=${shown} with the same job script): they resume where they stopped.`,
    );
  }
  const sources = Array.from({ length: count }, (_, index) => keyedLines(shardPaths(folder, { index, count }).lines, { index, count }));
  let lines = 0;
  let previous = 0;
  const ordered = mergeAscending(
    sources,
    (item) => item.line,
    (source, before, item) =>
      new RectboostError('bad-data', `${item.where} (list line ${item.line}) comes after list line ${before.line} in shard ${source}; run that shard again to put it in order.`),
  );
  await writeLinesAtomic(
    out,
    (async function* () {
      for await (const item of ordered) {
        if (item.line === previous) throw new RectboostError('bad-data', `List line ${item.line} is written twice (again at ${item.where}); delete that shard's files and run it again.`);
        previous = item.line;
        lines += 1;
        yield item.text;
      }
    })(),
  );
  return { shardCount: count, lines, failed: markers.reduce((sum, m) => sum + (m?.failed.length ?? 0), 0) };
}

async function readDoneMarker(folder: string, shard: Shard): Promise<ShardDoneMarker | undefined> {
  let marker: ShardDoneMarker;
  try {
    marker = JSON.parse(await readFile(shardPaths(folder, shard).done, 'utf8')) as ShardDoneMarker;
  } catch {
    return undefined; // absent, or cut short: the shard counts as unfinished
  }
  return marker.shard === shard.index && marker.shardCount === shard.count && Array.isArray(marker.failed) ? marker : undefined;
}

async function* keyedLines(path: string, shard: Shard): AsyncGenerator<{ line: number; text: string; where: string }> {
  for await (const { text, number } of fileLines(path)) {
    const where = `Line ${number} of ${path}`;
    const line = listLineOfDetectionLine(text, where);
    if (shardOfLine(line, shard.count) !== shard.index) {
      throw new RectboostError('bad-data', `${where} is list line ${line}, which belongs to shard ${shardOfLine(line, shard.count)}, not ${shard.index}; the file was not written by this split.`);
    }
    yield { line, text, where };
  }
}
