import { cascadeUsesTiltedFeatures, type DetectorCascade } from '../detect/detector-cascade.js';
import { resolveScanOptions, scanImage, scanScales, type ScanOptions } from '../detect/scan-image.js';
import { cropGrayImage, type GrayImage } from '../image/gray-image.js';
import { computeIntegralImage } from '../image/integral-image.js';
import type { Box } from '../metrics/intersection-over-union.js';

/** How far the scan window nearest to a box got through the cascade. */
export interface WindowDepth {
  /** The scan window used: a window the multiscale scan visits. */
  readonly window: Box;
  /** Stages passed, 0..stageCount; stageCount means the cascade accepted the window. */
  readonly stagesPassed: number;
  /** True when the window was rejected as flat (variance below FLAT_WINDOW_VARIANCE) before any stage. */
  readonly flat: boolean;
}

/**
 * The scan window nearest to `box` and the number of stages it passes.
 *
 * Nearest: of the scales scanImage visits for this image and options, the one
 * whose window sides are closest to the box's in log ratio (summed over width
 * and height); at that scale the window's top-left corner snaps to the scan grid
 * (multiples of the scale's step), centred on the box's centre and kept inside
 * the image. The window is then evaluated by scanImage itself, on a crop that
 * holds exactly that window, so the answer is what the full scan decided there
 * (window sums are exact integers, so the crop's σ and feature values are the
 * same bits). If two scales round to that same window size, the deeper outcome
 * is reported. Returns null when the image has no scan scale at all.
 * @example windowDepthNearBox(detector, image, [40, 32, 28, 28], { scaleStep: 1.25 })
 */
export function windowDepthNearBox(cascade: DetectorCascade, image: GrayImage, box: Box, options: ScanOptions = {}): WindowDepth | null {
  const resolved = resolveScanOptions(options);
  const scales = scanScales(cascade, image.width, image.height, resolved);
  let best: { width: number; height: number; step: number } | null = null;
  let bestDistance = Infinity;
  for (const scale of scales) {
    const width = Math.round(cascade.windowWidth * scale);
    const height = Math.round(cascade.windowHeight * scale);
    const distance = Math.abs(Math.log(width / box[2])) + Math.abs(Math.log(height / box[3]));
    if (distance < bestDistance) {
      bestDistance = distance;
      best = { width, height, step: Math.max(1, Math.round(resolved.shift * scale)) };
    }
  }
  if (best === null) return null;
  const snap = (centre: number, side: number, limit: number): number => {
    const lastSlot = Math.floor((limit - side) / best.step);
    return Math.min(Math.max(Math.round((centre - side / 2) / best.step), 0), lastSlot) * best.step;
  };
  const x = snap(box[0] + box[2] / 2, best.width, image.width);
  const y = snap(box[1] + box[3] / 2, best.height, image.height);
  const crop = cropGrayImage(image, x, y, best.width, best.height);
  const { statistics } = scanImage(cascade, computeIntegralImage(crop, { rotated: cascadeUsesTiltedFeatures(cascade) }), { ...resolved, smallestSide: Math.min(best.width, best.height) });
  let stagesPassed = 0;
  if (statistics.accepted > 0) stagesPassed = cascade.stages.length;
  else statistics.rejectedAtStage.forEach((count, k) => (stagesPassed = count > 0 ? Math.max(stagesPassed, k) : stagesPassed));
  const flat = statistics.flatWindows === statistics.windowsScanned && statistics.windowsScanned > 0 && cascade.stages.length > 0;
  return { window: [x, y, best.width, best.height], stagesPassed, flat };
}
