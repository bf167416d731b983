import seedrandom from 'seedrandom';
import type { CascadeModel, WeakClassifier } from '../../src/cascade/cascade-model.js';
import { createGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import type { Box } from '../../src/metrics/intersection-over-union.js';

/**
 * The synthetic object: a square of side L whose middle third (columns and rows
 * from round(L/3) to round(2L/3)) is bright (`bright`) on a dark surround (`dark`).
 * A "plus" of three-cell features keys on it: at 24×24 the middle 8×8 block is
 * bright and the side blocks are dark.
 */
export function paintObject(image: GrayImage, x: number, y: number, side: number, dark = 40, bright = 200): void {
  const low = Math.round(side / 3);
  const high = Math.round((2 * side) / 3);
  for (let row = 0; row < side; row++) {
    for (let column = 0; column < side; column++) {
      const inside = row >= low && row < high && column >= low && column < high;
      image.data[(y + row) * image.width + x + column] = inside ? bright : dark;
    }
  }
}

/** A seeded low-contrast noise background (grey levels 90..110). */
export function noiseBackground(width: number, height: number, seed: string): GrayImage {
  const random = seedrandom(seed);
  const image = createGrayImage(width, height);
  for (let i = 0; i < image.data.length; i++) image.data[i] = 90 + Math.floor(random() * 21);
  return image;
}

/**
 * A scene with objects at known places and sizes. Sizes are the detector's
 * window sides at scales 1.25^k (24, 30, 38, 47), so a scan with scale step 1.25
 * has a window of exactly that size; positions are arbitrary integers.
 */
export function syntheticScene(): { image: GrayImage; truth: Box[] } {
  const image = noiseBackground(200, 150, 'scene');
  const truth: Box[] = [
    [10, 12, 24, 24],
    [61, 7, 30, 30],
    [120, 20, 38, 38],
    [17, 80, 47, 47],
    [101, 95, 24, 24],
  ];
  for (const [x, y, side] of truth) paintObject(image, x, y, side);
  return { image, truth };
}

function weak(kind: 'three-horizontal' | 'three-vertical', splitValue: number): WeakClassifier {
  // Cells of 8×8: the horizontal feature spans rows 8..15, the vertical columns 8..15.
  const feature = kind === 'three-horizontal'
    ? { kind, x: 0, y: 8, cellWidth: 8, cellHeight: 8 }
    : { kind, x: 8, y: 0, cellWidth: 8, cellHeight: 8 };
  return { feature, splitValue, belowOutput: 0, aboveOutput: 1 };
}

/**
 * A hand-built 24×24 cascade keyed on the synthetic object (trained-cascade
 * version pending the trainer). On the object at scale 1 both features read
 * (2·64·200 − 2·64·40)/σ = 20480/σ with σ = 160·√(1/9·8/9) ≈ 50.3, i.e. ≈ 407;
 * on the noise background (σ ≈ 6) they read about ±√(6·64)·6/6 ≈ ±20.
 * Stage 0: the centre-versus-sides feature above 150. Stage 1: the
 * centre-versus-top/bottom feature above 150. Stage 2: both features against
 * rising splits, so the score (last-stage margin) peaks on the centred window.
 */
export function handBuiltCascade(): CascadeModel {
  return {
    format: 'rectboost-cascade',
    version: 1,
    window: { width: 24, height: 24 },
    normalization: 'window-standard-deviation',
    featureSet: 'basic',
    stages: [
      { threshold: 1, weakClassifiers: [weak('three-horizontal', 150)] },
      { threshold: 1, weakClassifiers: [weak('three-vertical', 150)] },
      {
        threshold: 2,
        weakClassifiers: [200, 260, 320, 380].flatMap((split) => [weak('three-horizontal', split), weak('three-vertical', split)]),
      },
    ],
  };
}
