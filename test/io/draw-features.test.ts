import { describe, expect, it } from 'vitest';
import type { HaarFeature } from '../../src/features/haar-feature.js';
import { drawFeatureSheet } from '../../src/io/draw-features.js';

// The drawing of one feature at zoom 1 on a mid-gray backdrop: a tinted pixel differs from 128.
function tinted(feature: HaarFeature, side: number): { positive: number; negative: number } {
  const sheet = drawFeatureSheet([[{ feature, splitValue: 0, belowOutput: -1, aboveOutput: 1 }]], side, side, new Array(side * side).fill(128), 1);
  let positive = 0;
  let negative = 0;
  for (let y = 0; y < side; y++) {
    for (let x = 0; x < side; x++) {
      const at = 3 * ((2 + y) * sheet.width + 2 + x);
      // Positive cells lean to orange (red > blue), negative ones to blue.
      if (sheet.data[at]! > sheet.data[at + 2]!) positive++;
      else if (sheet.data[at]! < sheet.data[at + 2]!) negative++;
    }
  }
  return { positive, negative };
}

describe('feature drawings', () => {
  it('draw a tilted two-cell feature as the 2·w·h pixels each of its cells sums', () => {
    // Cells of 2 × 3 on the 45° grid: 12 pixels each (tiltedRectangleSum's pixel set).
    expect(tinted({ kind: 'tilted-two-horizontal', x: 4, y: 0, cellWidth: 2, cellHeight: 3 }, 12)).toEqual({ positive: 12, negative: 12 });
  });

  it('draw the centre of a centre-surround feature over its ring', () => {
    // 3 × 3 cells of 2 × 2 pixels: the centre cell (4 pixels) positive, the ring (32 pixels) negative.
    expect(tinted({ kind: 'centre-surround', x: 1, y: 1, cellWidth: 2, cellHeight: 2 }, 8)).toEqual({ positive: 4, negative: 32 });
  });
});
