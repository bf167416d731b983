import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { intersectionOverUnion, type Box } from '../../src/metrics/intersection-over-union.js';
import { mergeDetections } from '../../src/detect/merge-detections.js';
import type { RawHits } from '../../src/detect/scan-image.js';

function hitsOf(list: Array<[number, number, number, number, number]>): RawHits {
  return {
    count: list.length,
    x: Float64Array.from(list.map((h) => h[0])),
    y: Float64Array.from(list.map((h) => h[1])),
    width: Float64Array.from(list.map((h) => h[2])),
    height: Float64Array.from(list.map((h) => h[3])),
    score: Float64Array.from(list.map((h) => h[4])),
  };
}

// Three hits around one object (pairwise IoU ≥ 81/119 ≈ 0.68 > 0.3) and one far away.
const hits = hitsOf([
  [0, 0, 10, 10, 1],
  [1, 1, 10, 10, 3],
  [2, 0, 10, 10, 2],
  [50, 50, 10, 10, 0.5],
]);

describe('merging raw hits', () => {
  it('nms keeps the best hit of each overlapping cluster and counts the suppressed ones as support', () => {
    expect(mergeDetections(hits, { method: 'nms', overlap: 0.3 })).toEqual([
      { box: [1, 1, 10, 10], score: 3, support: 3 },
      { box: [50, 50, 10, 10], score: 0.5, support: 1 },
    ]);
  });

  it('mean averages each group of overlapping hits: x = (0+1+2)/3, y = (0+1+0)/3', () => {
    const merged = mergeDetections(hits, { method: 'mean', overlap: 0.3, minSupport: 2 });
    expect(merged).toEqual([{ box: [1, 1 / 3, 10, 10], score: 3, support: 3 }]);
  });

  it('none returns every hit by score with support 1', () => {
    expect(mergeDetections(hits, { method: 'none' }).map((d) => d.score)).toEqual([3, 2, 1, 0.5]);
  });

  it('an overlap of 1 never suppresses (IoU > 1 is impossible)', () => {
    expect(mergeDetections(hits, { method: 'nms', overlap: 1 })).toHaveLength(4);
  });

  it('nms equals the textbook quadratic greedy loop on 400 random hits (brute-force twin)', () => {
    expectTextbookNms('nms-twin', 400, 10, 20, 150);
  });

  it('nms equals the textbook greedy loop on 2000 dense hits of sides 10..169 (brute-force twin, many overlaps per hit)', () => {
    expectTextbookNms('nms-dense-twin', 2000, 10, 160, 150);
  });
});

/** Greedy NMS at IoU 0.3 against the textbook quadratic loop, on seeded random square hits. */
function expectTextbookNms(seed: string, count: number, smallestSide: number, sideRange: number, extent: number): void {
  const random = seedrandom(seed);
  const list = Array.from({ length: count }, () => {
    const side = smallestSide + Math.floor(random() * sideRange);
    return [Math.floor(random() * extent), Math.floor(random() * extent), side, side, Math.round(random() * 50) / 10] as [number, number, number, number, number];
  });
  const raw = hitsOf(list);
  const order = list.map((_, i) => i).sort((a, b) => list[b]![4] - list[a]![4] || list[a]![0] - list[b]![0] || list[a]![1] - list[b]![1] || list[a]![2] - list[b]![2]);
  const suppressed = new Set<number>();
  const expected: Array<{ box: Box; score: number; support: number }> = [];
  order.forEach((i, a) => {
    if (suppressed.has(i)) return;
    let support = 1;
    for (const j of order.slice(a + 1)) {
      const boxI = list[i]!.slice(0, 4) as unknown as Box;
      const boxJ = list[j]!.slice(0, 4) as unknown as Box;
      if (!suppressed.has(j) && intersectionOverUnion(boxI, boxJ) > 0.3) {
        suppressed.add(j);
        support++;
      }
    }
    expected.push({ box: list[i]!.slice(0, 4) as unknown as Box, score: list[i]![4], support });
  });
  expect(mergeDetections(raw, { method: 'nms', overlap: 0.3 })).toEqual(expected);
}

describe('mean merging on dense hits', () => {
  it('links every isolated pair whose IoU exceeds the overlap, down to the pruning bounds (pairs far apart, overlap 0.5)', () => {
    // 900 pairs 1000 px apart, so each pair is one group or two by its own IoU, and a
    // pruned linking pair shows up as a wrong support. The hardest pairs for the
    // sweep's bounds: a full-height slice at box i's right edge, or a full-width
    // slice at its bottom, a fraction s of i's side: IoU = s, linked when s > 0.5.
    const random = seedrandom('mean-pairs');
    const list: Array<[number, number, number, number, number]> = [];
    const expected: number[] = [];
    for (let k = 0; k < 900; k++) {
      const [x, width, height] = [k * 1000, 20 + random() * 40, 20 + random() * 40];
      const first: Box = [x, 0, width, height];
      const fraction = 0.5 * (1 + (random() - 0.3) * 0.02); // 0.497 … 0.507
      const second: Box = k % 3 === 0
        ? [x + width * (1 - fraction), 0, width * fraction, height]
        : k % 3 === 1
          ? [x, height * (1 - fraction), width, height * fraction]
          : [x + width * 0.3 * random(), height * 0.2 * random(), width * (0.8 + 0.4 * random()), height * (0.8 + 0.4 * random())];
      list.push([...first, 1], [...second, 0.5]);
      if (intersectionOverUnion(first, second) > 0.5) expected.push(2);
      else expected.push(1, 1);
    }
    expect(expected.filter((support) => support === 2).length).toBeGreaterThan(200);
    expect(expected.filter((support) => support === 1).length).toBeGreaterThan(200);
    const merged = mergeDetections(hitsOf(list), { method: 'mean', overlap: 0.5 });
    expect(merged.map((d) => d.support).sort()).toEqual(expected.sort());
  });

  // The sweep prunes pairs that cannot reach IoU > overlap (see meanOfGroups);
  // rectangular boxes on a quarter-pixel grid and several overlaps check that no
  // linking pair is pruned.
  for (const [overlap, shape] of [[0.4, 'square, whole pixels'], [0, 'rectangular, quarter pixels'], [0.5, 'rectangular, quarter pixels'], [0.8, 'rectangular, quarter pixels']] as const) {
    it(`groups exactly as union-find over every pair (quadratic twin) on 1500 hits, overlap ${overlap}, ${shape}`, () => {
      const random = seedrandom(`mean-twin-${overlap}-${shape}`);
      const whole = shape.startsWith('square');
      const list: Array<[number, number, number, number, number]> = [];
      for (let i = 0; i < 1500; i++) {
        const side = 10 + Math.floor(random() * 60);
        const height = whole ? side : side * (0.5 + random());
        const snap = (value: number): number => (whole ? Math.floor(value) : Math.round(value * 4) / 4);
        // (spread wider at overlap 0, where any touching boxes link)
        const spread = overlap === 0 ? 8 : 1;
        list.push([snap(random() * 300 * spread), snap(random() * 200 * spread), side, snap(height) || 1, Math.round(random() * 1000) / 100]);
      }
      const boxes: Box[] = list.map(([x, y, w, h]) => [x, y, w, h]);
      const parent = boxes.map((_, i) => i);
      const root = (i: number): number => (parent[i] === i ? i : (parent[i] = root(parent[i]!)));
      for (let i = 0; i < boxes.length; i++) {
        for (let j = i + 1; j < boxes.length; j++) if (intersectionOverUnion(boxes[i]!, boxes[j]!) > overlap) parent[root(j)] = root(i);
      }
      const sizes = new Map<number, number>();
      boxes.forEach((_, i) => sizes.set(root(i), (sizes.get(root(i)) ?? 0) + 1));
      expect(sizes.size).toBeGreaterThan(5); // several groups: the test can tell groupings apart
      expect(sizes.size).toBeLessThan(1500);
      const merged = mergeDetections(hitsOf(list), { method: 'mean', overlap });
      expect(merged.map((d) => d.support).sort((a, b) => a - b)).toEqual([...sizes.values()].sort((a, b) => a - b));
      expect(merged.reduce((n, d) => n + d.support, 0)).toBe(1500);
    });
  }
});
