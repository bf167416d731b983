import { RectboostError } from '../errors.js';

/**
 * One part of an image list split N ways: `index` from 0 to `count` − 1.
 * Line n of the list (1-based, empty lines counted) belongs to shard
 * (n − 1) mod count, so the split needs no look-ahead (a list can be streamed),
 * every line lands in exactly one shard, and neighbouring lines — often images
 * of one folder and one size — are spread over all shards.
 */
export interface Shard {
  readonly index: number;
  readonly count: number;
}

/** The whole list as one shard. */
export const WHOLE_LIST: Shard = { index: 0, count: 1 };

/** Most shards a list can be split into (a Slurm array is far smaller by default). */
export const MAX_SHARDS = 1_000_000;

/** The shard that list line `line` (1-based) belongs to. */
export function shardOfLine(line: number, count: number): number {
  return (line - 1) % count;
}

/** True when list line `line` (1-based) belongs to `shard`. */
export function lineInShard(line: number, shard: Shard): boolean {
  return shardOfLine(line, shard.count) === shard.index;
}

/**
 * Parses `K/N` (K from 0 to N − 1, the numbering of `sbatch --array=0-(N-1)`).
 * @throws RectboostError `invalid-option` naming `option` when the text is not of that form.
 * @example parseShard('--shard', '2/4') // { index: 2, count: 4 }
 */
export function parseShard(option: string, text: string): Shard {
  const match = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  const index = match ? Number(match[1]) : NaN;
  const count = match ? Number(match[2]) : NaN;
  if (!match || count < 1 || count > MAX_SHARDS || index >= count) {
    throw new RectboostError(
      'invalid-option',
      `${option} must look like K/N with N from 1 to ${MAX_SHARDS} and K from 0 to N-1 (e.g. 0/4 … 3/4); received "${text}".`,
    );
  }
  return { index, count };
}

/**
 * The shard of a Slurm array task: SLURM_ARRAY_TASK_ID of SLURM_ARRAY_TASK_COUNT,
 * or undefined outside an array job. Only arrays numbered 0 to N − 1 in steps of 1
 * map onto shards; for any other numbering (or a single task re-submitted with
 * `--array=K`, whose count is 1) pass `--shard K/N` instead, which this refuses
 * to guess.
 * @throws RectboostError `invalid-option` when the variables are set but do not describe such an array.
 */
export function shardFromEnvironment(environment: Readonly<Record<string, string | undefined>>): Shard | undefined {
  const id = environment['SLURM_ARRAY_TASK_ID'];
  const count = environment['SLURM_ARRAY_TASK_COUNT'];
  if (id === undefined && count === undefined) return undefined;
  const text = `${id ?? '?'}/${count ?? '?'}`;
  const min = environment['SLURM_ARRAY_TASK_MIN'];
  const step = environment['SLURM_ARRAY_TASK_STEP'];
  const numbered = (min === undefined || min === '0') && (step === undefined || step === '1');
  if (!numbered || !/^\d+$/.test(id ?? '') || !/^\d+$/.test(count ?? '') || Number(id) >= Number(count)) {
    throw new RectboostError(
      'invalid-option',
      `This Slurm array task (SLURM_ARRAY_TASK_ID/SLURM_ARRAY_TASK_COUNT = ${text}, min ${min ?? 'unset'}, step ${step ?? 'unset'}) ` +
        'does not name one shard of 0 to N-1; submit with --array=0-(N-1), or pass --shard K/N explicitly.',
    );
  }
  return parseShard('SLURM_ARRAY_TASK_ID/SLURM_ARRAY_TASK_COUNT', text);
}

/** File stem of a shard's output: `shard-K-of-N` (K zero-padded to N's width so names sort). */
export function shardFileStem(shard: Shard): string {
  const width = String(shard.count - 1).length;
  return `shard-${String(shard.index).padStart(width, '0')}-of-${shard.count}`;
}

/** Reads a stem written by shardFileStem back, or undefined when `name` is not one. */
export function parseShardFileStem(name: string): Shard | undefined {
  const match = /^shard-(\d+)-of-(\d+)$/.exec(name);
  if (!match) return undefined;
  const shard = { index: Number(match[1]), count: Number(match[2]) };
  return shard.index < shard.count && shardFileStem(shard) === name ? shard : undefined;
}
