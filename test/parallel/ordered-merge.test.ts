import { describe, expect, it } from 'vitest';
import { mergeAscending } from '../../src/parallel/ordered-merge.js';

async function collect<T>(items: AsyncIterable<T>): Promise<T[]> {
  const out: T[] = [];
  for await (const item of items) out.push(item);
  return out;
}

describe('mergeAscending', () => {
  it('equals sorting the concatenation (brute-force twin) for seeded random sources, ties in source order', async () => {
    let seed = 12345;
    const next = (): number => (seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31; // LCG constants of the C standard's example rand()
    for (let trial = 0; trial < 20; trial++) {
      const sources = Array.from({ length: 1 + Math.floor(next() * 9) }, (_, source) =>
        Array.from({ length: Math.floor(next() * 30) }, () => Math.floor(next() * 50))
          .sort((a, b) => a - b)
          .map((key, k) => ({ key, source, k })),
      );
      // Array.prototype.sort is stable, so the twin keeps source order for equal keys too.
      const twin = sources.flat().sort((a, b) => a.key - b.key || a.source - b.source);
      expect(await collect(mergeAscending(sources, (item) => item.key))).toEqual(twin);
    }
  });

  it('reads asynchronous sources and stops on a source that goes backwards', async () => {
    async function* lines(keys: number[]): AsyncGenerator<number> {
      for (const key of keys) yield key;
    }
    expect(await collect(mergeAscending([lines([1, 5]), lines([2, 3, 9]), lines([])], (n) => n))).toEqual([1, 2, 3, 5, 9]);
    await expect(collect(mergeAscending([lines([1, 4, 2])], (n) => n, (source, before, item) => new Error(`source ${source}: ${item} after ${before}`)))).rejects.toThrow('source 0: 2 after 4');
  });
});
