import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import { compileFeatures, evaluateCompiledFeature } from '../../src/features/compiled-features.js';
import { countFeatures, countFeaturesOfKind, enumerateFeatures } from '../../src/features/enumerate-features.js';
import { evaluateFeature } from '../../src/features/evaluate-feature.js';
import { CELL_LAYOUTS, EXTENDED_FEATURE_KINDS, EXTENDED_ONLY_FEATURE_KINDS, FEATURE_SET_KINDS } from '../../src/features/feature-kind.js';
import { featureFitsWindow, scaledFeatureCells, type HaarFeature } from '../../src/features/haar-feature.js';
import { packWindowSamples } from '../../src/features/window-samples.js';
import { createGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { worstAffineDifference } from '../helpers/affine-invariance.js';
import { randomGrayImage } from '../helpers/random-image.js';

/**
 * The brute-force reference: a feature's per-pixel weight map, written from the
 * layout's cell weights (not its blocks) and each cell's pixels — upright cells as
 * boxes, tilted cells as the pixels (i, j) whose rotated coordinates u = i + j + 1 and
 * v = j − i fall in the cell (HaarFeature: a cell spans cellWidth steps down-right
 * and cellHeight steps down-left from its top corner).
 */
function pixelWeights(feature: HaarFeature, windowWidth: number, windowHeight: number): Float64Array {
  const { columns, rows, weights, tilted } = CELL_LAYOUTS[feature.kind];
  const map = new Float64Array(windowWidth * windowHeight);
  for (let row = 0; row < rows; row++) {
    for (let column = 0; column < columns; column++) {
      const weight = weights[row * columns + column]!;
      for (let j = 0; j < windowHeight; j++) {
        for (let i = 0; i < windowWidth; i++) {
          let inside: boolean;
          if (!tilted) {
            const left = feature.x + column * feature.cellWidth;
            const top = feature.y + row * feature.cellHeight;
            inside = i >= left && i < left + feature.cellWidth && j >= top && j < top + feature.cellHeight;
          } else {
            const topX = feature.x + column * feature.cellWidth - row * feature.cellHeight;
            const topY = feature.y + column * feature.cellWidth + row * feature.cellHeight;
            const u = i + j + 1 - (topX + topY);
            const v = j - i - (topY - topX);
            inside = u > 0 && u <= 2 * feature.cellWidth && v > 0 && v <= 2 * feature.cellHeight;
          }
          if (inside) map[j * windowWidth + i]! += weight;
        }
      }
    }
  }
  return map;
}

function bruteForceValue(feature: HaarFeature, window: GrayImage): number {
  const map = pixelWeights(feature, window.width, window.height);
  let value = 0;
  for (let p = 0; p < map.length; p++) value += map[p]! * window.data[p]!;
  return value;
}

describe('extended feature set: enumeration', () => {
  it('holds the basic kinds first, then the six added ones', () => {
    expect(FEATURE_SET_KINDS.extended).toEqual(EXTENDED_FEATURE_KINDS);
    expect(FEATURE_SET_KINDS.extended.slice(5)).toEqual([...EXTENDED_ONLY_FEATURE_KINDS]);
  });

  it('counts small windows as derived by hand', () => {
    // Tilted two cells of 1 × 1 need a 3 × 3 footprint (a + b = 2 + 1): one position in 3 × 3.
    expect(countFeaturesOfKind('tilted-two-horizontal', 3, 3)).toBe(1);
    // In 4 × 4: span 3 (w = h = 1) fits 2 × 2 positions; span 4 needs 2w + h = 4 → w = 1, h = 2: 1 position.
    expect(countFeaturesOfKind('tilted-two-horizontal', 4, 4)).toBe(5);
    // Centre-surround 3 × 3 cells of 1 pixel: one position in 3 × 3; the tilted one needs span 6.
    expect(countFeaturesOfKind('centre-surround', 3, 3)).toBe(1);
    expect(countFeaturesOfKind('tilted-centre-surround', 5, 5)).toBe(0);
    expect(countFeaturesOfKind('tilted-centre-surround', 6, 6)).toBe(1);
  });

  for (const [width, height] of [[9, 7], [12, 12], [5, 11], [24, 24]] as const) {
    it(`enumerates the closed-form count of every kind in ${width}×${height}, each inside the window, none twice`, () => {
      for (const kind of EXTENDED_FEATURE_KINDS) {
        const features = enumerateFeatures(width, height, [kind]);
        expect(features.length, kind).toBe(countFeaturesOfKind(kind, width, height));
        expect(features.every((feature) => featureFitsWindow(feature, width, height)), kind).toBe(true);
        expect(new Set(features.map((f) => `${f.x}/${f.y}/${f.cellWidth}/${f.cellHeight}`)).size, kind).toBe(features.length);
      }
      expect(enumerateFeatures(width, height, FEATURE_SET_KINDS.extended)).toHaveLength(countFeatures(width, height, FEATURE_SET_KINDS.extended));
    });
  }

  it('finds every fitting feature: an exhaustive search over anchors and cell sizes gives the same counts', () => {
    const [width, height] = [8, 6];
    for (const kind of EXTENDED_FEATURE_KINDS) {
      let fitting = 0;
      for (let cellWidth = 1; cellWidth <= 8; cellWidth++) {
        for (let cellHeight = 1; cellHeight <= 8; cellHeight++) {
          for (let y = 0; y <= height; y++) for (let x = 0; x <= width; x++) if (featureFitsWindow({ kind, x, y, cellWidth, cellHeight }, width, height)) fitting++;
        }
      }
      expect(fitting, kind).toBe(countFeaturesOfKind(kind, width, height));
    }
  });
});

describe('extended feature set: values', () => {
  const window = randomGrayImage(11, 9, 'extended-values');
  const features = enumerateFeatures(11, 9, EXTENDED_FEATURE_KINDS);

  it('every weight map sums to zero, and the centre-surround centre weighs +8 against a ring of −1', () => {
    for (const feature of features.filter((_, i) => i % 11 === 0)) {
      expect(pixelWeights(feature, 11, 9).reduce((a, b) => a + b, 0)).toBe(0);
    }
    const map = pixelWeights({ kind: 'centre-surround', x: 0, y: 0, cellWidth: 1, cellHeight: 1 }, 3, 3);
    expect(Array.from(map)).toEqual([-1, -1, -1, -1, 8, -1, -1, -1, -1]);
  });

  it('evaluateFeature at scale 1 equals the per-pixel brute force for every feature of every kind', () => {
    const integral = computeIntegralImage(window, { rotated: true });
    for (const feature of features) expect(evaluateFeature(integral, feature, 0, 0)).toBe(bruteForceValue(feature, window));
  });

  it('compiled features on packed samples equal the brute force (the response-table path)', () => {
    const windows = [window, randomGrayImage(11, 9, 'extended-values-2')];
    const samples = packWindowSamples(windows, 11, 9, undefined, { rotated: true });
    expect(samples.rotatedAt).toBe(12 * 10);
    expect(samples.tableSize).toBe(2 * 12 * 10);
    const compiled = compileFeatures(features, 12, samples.rotatedAt);
    for (let f = 0; f < features.length; f++) {
      for (let s = 0; s < windows.length; s++) {
        expect(evaluateCompiledFeature(compiled, f, samples.tables, s * samples.tableSize)).toBe(bruteForceValue(features[f]!, windows[s]!));
      }
    }
  });

  it('reads 6 corners for tilted two-cell, 8 for tilted three-cell and 8 for either centre-surround', () => {
    const reads = (feature: HaarFeature) => compileFeatures([feature], 12, 120).offsets.length;
    expect(reads({ kind: 'tilted-two-horizontal', x: 3, y: 0, cellWidth: 2, cellHeight: 3 })).toBe(6);
    expect(reads({ kind: 'tilted-three-vertical', x: 6, y: 0, cellWidth: 2, cellHeight: 2 })).toBe(8);
    expect(reads({ kind: 'centre-surround', x: 1, y: 1, cellWidth: 2, cellHeight: 2 })).toBe(8);
    expect(reads({ kind: 'tilted-centre-surround', x: 3, y: 0, cellWidth: 1, cellHeight: 1 })).toBe(8);
  });

  it('refuses a tilted feature on tables without the rotated part', () => {
    const feature: HaarFeature = { kind: 'tilted-two-vertical', x: 4, y: 0, cellWidth: 2, cellHeight: 2 };
    expect(() => evaluateFeature(computeIntegralImage(window), feature, 0, 0)).toThrow(/rotated/);
    expect(() => compileFeatures([feature], 12)).toThrow(/rotated/);
  });
});

describe('extended feature set: invariances and scaling', () => {
  // Pixels kept in 0..63 so that 3·I + 20 still fits in 8 bits exactly.
  const base = createGrayImage(12, 10, randomGrayImage(12, 10, 'extended-invariance').data.map((v) => v >> 2));
  const features = enumerateFeatures(12, 10, EXTENDED_ONLY_FEATURE_KINDS);

  it('normalized values on a·I + b (a > 0) equal those on I (Viola & Jones 2001 §5.1 variance normalization)', () => {
    expect(worstAffineDifference(base, features, 3, 20, { rotated: true })).toBeLessThan(1e-9);
  });

  it('every added feature reads 0 on a flat window at scale 1 and at rounded scales', () => {
    const flat = computeIntegralImage(createGrayImage(40, 40, new Uint8Array(1600).fill(200)), { rotated: true });
    for (const scale of [1, 1.25, 1.7, 2, 2.9]) {
      for (const feature of features.filter((_, i) => i % 5 === 0)) {
        expect(Math.abs(evaluateFeature(flat, feature, 1, 2, scale, 12, 10))).toBeLessThan(1e-9);
      }
    }
  });

  it('scaled tilted cells stay 45° rectangles inside the rounded window, contiguous unless the window edge forced a clamp', () => {
    const random = seedrandom('tilted-scales');
    let contiguous = 0;
    let pairs = 0;
    for (let trial = 0; trial < 300; trial++) {
      const scale = 1 + random() * 3;
      const feature = features[Math.floor(random() * features.length)]!;
      const scaledWidth = Math.round(12 * scale);
      const scaledHeight = Math.round(10 * scale);
      const cells = scaledFeatureCells(feature, scale, 12, 10);
      for (const cell of cells) {
        expect(cell.width >= 1 && cell.height >= 1).toBe(true);
        if (cell.tilted !== true) continue;
        expect(cell.x - cell.height).toBeGreaterThanOrEqual(0);
        expect(cell.x + cell.width).toBeLessThanOrEqual(scaledWidth);
        expect(cell.y).toBeGreaterThanOrEqual(0);
        expect(cell.y + cell.width + cell.height).toBeLessThanOrEqual(scaledHeight);
      }
      // Neighbouring cells along the grid's x axis: the right corner of one is the top of the next.
      if (CELL_LAYOUTS[feature.kind].rows === 1 && cells.length > 1) {
        for (let c = 0; c + 1 < cells.length; c++) {
          pairs++;
          if (cells[c]!.x + cells[c]!.width === cells[c + 1]!.x && cells[c]!.y + cells[c]!.width === cells[c + 1]!.y) contiguous++;
        }
      }
    }
    expect(pairs).toBeGreaterThan(50);
    // Measured: the clamp at the window's edge is rare.
    expect(contiguous / pairs).toBeGreaterThan(0.9);
  });

  it('an integer scale k maps a tilted cell with top corner (x, y) to top corner (kx, ky) and sides k times as long', () => {
    const [cell] = scaledFeatureCells({ kind: 'tilted-two-horizontal', x: 3, y: 2, cellWidth: 2, cellHeight: 3 }, 2, 12, 10);
    expect(cell).toEqual({ x: 6, y: 4, width: 4, height: 6, weight: 0.25, tilted: true });
  });
});
