import { describe, expect, it } from 'vitest';
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
});
