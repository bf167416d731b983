import seedrandom from 'seedrandom';
import type { CascadeModel, WeakClassifier } from '../../src/cascade/cascade-model.js';
import { createGrayImage, resizeGrayImage, type GrayImage } from '../../src/image/gray-image.js';
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
 * A scene with objects at known places and sizes, for a detector window of
 * `side` × `side` pixels (default 24). Object sides are round(side · 1.25^k)
 * (24, 30, 38, 47 for side 24; 12, 15, 19, 23 for side 12), so a scan with
 * scale step 1.25 has a window of exactly that size; positions and the image
 * (200 × 150 at side 24) scale with side / 24.
 */
export function syntheticScene(side = 24): { image: GrayImage; truth: Box[] } {
  const factor = side / 24;
  const image = noiseBackground(Math.round(200 * factor), Math.round(150 * factor), 'scene');
  const places: [number, number, number][] = [[10, 12, 0], [61, 7, 1], [120, 20, 2], [17, 80, 3], [101, 95, 0]];
  const truth: Box[] = places.map(([x, y, k]) => {
    const size = Math.round(side * 1.25 ** k);
    return [Math.round(x * factor), Math.round(y * factor), size, size];
  });
  for (const [x, y, size] of truth) paintObject(image, x, y, size);
  return { image, truth };
}

/**
 * Training positives for the synthetic object: `count` patches of side × side.
 * Each is painted at a random size from side to 2·side − 1 pixels and resized
 * to side × side (resizeGrayImage), so the patches carry the rounding of cell
 * edges that a scan meets at scales above 1; the dark level is drawn from
 * 25..70, the bright level from 150..230, and every pixel then moves by up to
 * ±8 grey levels.
 */
export function syntheticObjectPatches(side: number, count: number, seed: string): GrayImage[] {
  const random = seedrandom(seed);
  return Array.from({ length: count }, () => {
    const paintedSide = side + Math.floor(random() * side);
    const painted = createGrayImage(paintedSide, paintedSide);
    paintObject(painted, 0, 0, paintedSide, 25 + Math.floor(random() * 46), 150 + Math.floor(random() * 81));
    const patch = resizeGrayImage(painted, side, side);
    for (let i = 0; i < patch.data.length; i++) patch.data[i] = Math.max(0, Math.min(255, patch.data[i]! + Math.round((random() - 0.5) * 16)));
    return patch;
  });
}

/**
 * Training backgrounds without the object: the scene's noise (grey levels
 * 90..110) cluttered with 14 blocks of random size (4..27 pixels a side), each
 * either uniform (grey level 20..230) or half of the object — a dark block
 * crossed by one bright band through its middle third, horizontal or
 * vertical. The half-objects answer one of the object's two three-cell
 * contrasts but not the other, so a cascade needs more than one feature, and
 * training more than one stage, to tell them from the object.
 */
export function clutteredBackgrounds(width: number, height: number, count: number, seed: string): GrayImage[] {
  const random = seedrandom(seed);
  return Array.from({ length: count }, (_, index) => {
    const image = noiseBackground(width, height, `${seed}-${index}`);
    for (let block = 0; block < 14; block++) {
      const blockWidth = 4 + Math.floor(random() * 24);
      const blockHeight = 4 + Math.floor(random() * 24);
      const left = Math.floor(random() * (width - blockWidth));
      const top = Math.floor(random() * (height - blockHeight));
      const kind = Math.floor(random() * 3);
      const dark = 20 + Math.floor(random() * 60);
      const bright = 150 + Math.floor(random() * 81);
      for (let y = 0; y < blockHeight; y++) {
        for (let x = 0; x < blockWidth; x++) {
          const inBand = kind === 1
            ? y >= Math.round(blockHeight / 3) && y < Math.round((2 * blockHeight) / 3)
            : x >= Math.round(blockWidth / 3) && x < Math.round((2 * blockWidth) / 3);
          image.data[(top + y) * width + left + x] = kind === 0 ? dark + bright - 150 : inBand ? bright : dark;
        }
      }
    }
    return image;
  });
}

function weak(kind: 'three-horizontal' | 'three-vertical', splitValue: number): WeakClassifier {
  // Cells of 8×8: the horizontal feature spans rows 8..15, the vertical columns 8..15.
  const feature = kind === 'three-horizontal'
    ? { kind, x: 0, y: 8, cellWidth: 8, cellHeight: 8 }
    : { kind, x: 8, y: 0, cellWidth: 8, cellHeight: 8 };
  return { feature, splitValue, belowOutput: 0, aboveOutput: 1 };
}

/**
 * A hand-built 24×24 cascade keyed on the synthetic object, for tests that need
 * decisions worked out by hand (the scan test trains its own). On the object at scale 1 both features read
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
