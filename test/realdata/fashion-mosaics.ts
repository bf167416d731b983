import { createGrayImage, type GrayImage } from '../../src/image/gray-image.js';
import type { Box } from '../../src/metrics/intersection-over-union.js';

/** Side of a Fashion-MNIST item (Xiao et al. 2017), used as the model window without resizing. */
export const FASHION_SIDE = 28;
/** A mosaic is MOSAIC_ITEMS × MOSAIC_ITEMS items: 224 × 224 pixels. */
export const MOSAIC_ITEMS = 8;

/**
 * Tiles items row by row into mosaics of MOSAIC_ITEMS × MOSAIC_ITEMS cells of FASHION_SIDE
 * pixels (64 items each; a last partial mosaic is dropped), with the cell of every item whose
 * label is `objectLabel` as a truth box.
 */
export function buildMosaicScenes(items: readonly GrayImage[], labels: readonly number[], objectLabel: number): Array<{ image: GrayImage; truth: Box[] }> {
  const perMosaic = MOSAIC_ITEMS ** 2;
  const width = MOSAIC_ITEMS * FASHION_SIDE;
  return Array.from({ length: Math.floor(items.length / perMosaic) }, (_, m) => {
    const image = createGrayImage(width, width);
    const truth: Box[] = [];
    for (let k = 0; k < perMosaic; k++) {
      const item = items[m * perMosaic + k]!;
      const left = (k % MOSAIC_ITEMS) * FASHION_SIDE;
      const top = Math.floor(k / MOSAIC_ITEMS) * FASHION_SIDE;
      for (let row = 0; row < FASHION_SIDE; row++) image.data.set(item.data.subarray(row * FASHION_SIDE, (row + 1) * FASHION_SIDE), (top + row) * width + left);
      if (labels[m * perMosaic + k] === objectLabel) truth.push([left, top, FASHION_SIDE, FASHION_SIDE]);
    }
    return { image, truth };
  });
}
