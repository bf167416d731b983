import { describe, expect, it } from 'vitest';
import { imageListEntries } from '../../src/data/image-list.js';
import { lineInShard, parseShard, parseShardFileStem, shardFileStem, shardFromEnvironment } from '../../src/parallel/shard.js';
import { errorOf } from '../helpers/error-of.js';

function messageOf(action: () => unknown): string {
  const error = errorOf(action);
  return error instanceof Error ? error.message : 'no error';
}

/** A list with what real lists hold: empty and blank lines, CRLF endings, a path listed three times. */
const LIST = ['a.png', '', 'b.png', 'a.png', '   ', 'c d.png\r', 'e.png', 'a.png', '', 'f.png', 'g.png', ' h.png '];

describe('shards of an image list', () => {
  for (const count of [1, 2, 7]) {
    it(`split ${count} ways is a partition: every non-empty line in exactly one shard, with its line number`, () => {
      const whole = [...imageListEntries(LIST)];
      const parts = Array.from({ length: count }, (_, index) => [...imageListEntries(LIST, { index, count })]);
      // Brute-force twin: the non-empty lines, numbered from 1, read straight off the array.
      const expected = LIST.flatMap((text, k) => (text.trim() === '' ? [] : [{ line: k + 1, image: text.trim() }]));
      expect(whole).toEqual(expected);
      const union = parts.flat().sort((x, y) => x.line - y.line);
      expect(union).toEqual(expected); // nothing lost, nothing twice (line numbers are unique)
      for (const [index, part] of parts.entries()) {
        for (const entry of part) expect((entry.line - 1) % count).toBe(index);
      }
    });
  }

  it('keeps a path that is listed several times as several entries, one per line', () => {
    const lines = [...imageListEntries(LIST)].filter((e) => e.image === 'a.png').map((e) => e.line);
    expect(lines).toEqual([1, 4, 8]);
  });

  it('assigns a line to the same shard whatever follows it (no look-ahead)', () => {
    const longer = [...LIST, 'x.png', 'y.png', 'z.png'];
    const shard = { index: 3, count: 7 };
    const before = [...imageListEntries(LIST, shard)];
    expect([...imageListEntries(longer, shard)].slice(0, before.length)).toEqual(before);
  });

  it('reads K/N with K from 0 to N-1 and refuses anything else, naming the option', () => {
    expect(parseShard('--shard', '2/4')).toEqual({ index: 2, count: 4 });
    expect(parseShard('--shard', '0/1')).toEqual({ index: 0, count: 1 });
    for (const text of ['4/4', '1/0', '-1/3', '1.5/3', '2', 'a/b', '']) {
      expect(messageOf(() => parseShard('--shard', text))).toMatch(/^--shard must look like K\/N .*received "/);
    }
  });

  it('takes the shard from the Slurm array variables of an array numbered 0 to N-1', () => {
    expect(shardFromEnvironment({})).toBeUndefined();
    expect(shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '3', SLURM_ARRAY_TASK_COUNT: '8', SLURM_ARRAY_TASK_MIN: '0', SLURM_ARRAY_TASK_STEP: '1' })).toEqual({ index: 3, count: 8 });
    // A task re-submitted alone (--array=3) sees a count of 1: refused rather than guessed.
    expect(messageOf(() => shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '3', SLURM_ARRAY_TASK_COUNT: '1', SLURM_ARRAY_TASK_MIN: '3' }))).toMatch(/pass --shard K\/N explicitly/);
    expect(messageOf(() => shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '4', SLURM_ARRAY_TASK_COUNT: '4', SLURM_ARRAY_TASK_MIN: '1' }))).toMatch(/--array=0-\(N-1\)/);
    expect(messageOf(() => shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '4', SLURM_ARRAY_TASK_COUNT: '3', SLURM_ARRAY_TASK_STEP: '2' }))).toMatch(/step 2/);
  });

  it('names shard files so that they sort in shard order and reads the names back', () => {
    const names = Array.from({ length: 12 }, (_, index) => shardFileStem({ index, count: 12 }));
    expect(names[0]).toBe('shard-00-of-12');
    expect([...names].sort()).toEqual(names);
    expect(names.map(parseShardFileStem)).toEqual(Array.from({ length: 12 }, (_, index) => ({ index, count: 12 })));
    expect(parseShardFileStem('shard-3-of-12')).toBeUndefined(); // not padded: not ours
    expect(parseShardFileStem('shard-12-of-12')).toBeUndefined();
    expect(lineInShard(13, { index: 0, count: 12 })).toBe(true); // (13 - 1) mod 12 = 0
  });
});
