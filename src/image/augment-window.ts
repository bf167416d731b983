import { checkInteger, checkNumber } from '../check.js';
import type { GrayImage } from './gray-image.js';

/**
 * How far an augmented copy of a positive may differ from it. Each draw is uniform in its
 * range (scale and contrast uniform in the logarithm, so shrinking and growing are equally
 * likely). The defaults are common practice for small object windows, not measured optima:
 * shifts of a few per cent of the window, scale within ±10 %, rotation within ±10°, contrast
 * within ×0.8–×1.25 and brightness within ±20 gray levels.
 */
export interface AugmentationLimits {
  /** Largest shift, as a share of the window side, in [0, 0.5]. */
  readonly shiftShare: number;
  /** Largest scale factor (≥ 1); the scale is drawn from [1/maxScale, maxScale]. */
  readonly maxScale: number;
  /** Largest rotation in degrees, in [0, 180]. */
  readonly maxRotationDegrees: number;
  /** Largest contrast factor (≥ 1); drawn from [1/maxContrast, maxContrast]. */
  readonly maxContrast: number;
  /** Largest brightness offset in gray levels, in [0, 255]. */
  readonly maxBrightness: number;
}

/** The limits `train --augment` uses (see AugmentationLimits for where they come from). */
export const DEFAULT_AUGMENTATION: AugmentationLimits = {
  shiftShare: 0.05,
  maxScale: 1.1,
  maxRotationDegrees: 10,
  maxContrast: 1.25,
  maxBrightness: 20,
};

/** One draw of the transform: what augmentWindow applies. */
export interface AugmentationDraw {
  readonly shiftX: number;
  readonly shiftY: number;
  readonly scale: number;
  readonly rotationRadians: number;
  readonly contrast: number;
  readonly brightness: number;
}

/** Draws one transform within `limits` from `random` (six draws, in the order of the fields). */
export function drawAugmentation(random: () => number, windowWidth: number, windowHeight: number, limits: AugmentationLimits = DEFAULT_AUGMENTATION): AugmentationDraw {
  const symmetric = (limit: number): number => (2 * random() - 1) * limit;
  const logSymmetric = (limit: number): number => Math.exp(symmetric(Math.log(limit)));
  return {
    shiftX: symmetric(limits.shiftShare * windowWidth),
    shiftY: symmetric(limits.shiftShare * windowHeight),
    scale: logSymmetric(limits.maxScale),
    rotationRadians: (symmetric(limits.maxRotationDegrees) * Math.PI) / 180,
    contrast: logSymmetric(limits.maxContrast),
    brightness: symmetric(limits.maxBrightness),
  };
}

/**
 * Applies one transform to a window: the content is scaled by `scale` and rotated by
 * `rotationRadians` about the window centre, then moved by (shiftX, shiftY) pixels; each
 * output pixel centre is mapped back into the source and sampled bilinearly, with the border
 * pixels repeated outside the window. Gray levels become contrast·(v − 128) + 128 + brightness,
 * rounded and clipped to 0..255. The output has the input's size.
 *
 * Note: windows are variance-normalized (a·I + b gets the decisions of I), so contrast and
 * brightness change a window's features only where clipping or rounding bites; they are kept
 * because real exposures do clip.
 */
export function applyAugmentation(image: GrayImage, draw: AugmentationDraw): GrayImage {
  const { width, height, data } = image;
  const out = new Uint8Array(width * height);
  const centreX = width / 2;
  const centreY = height / 2;
  const cos = Math.cos(draw.rotationRadians) / draw.scale;
  const sin = Math.sin(draw.rotationRadians) / draw.scale;
  const sample = (x: number, y: number): number => data[Math.min(height - 1, Math.max(0, y)) * width + Math.min(width - 1, Math.max(0, x))]!;
  for (let v = 0; v < height; v++) {
    for (let u = 0; u < width; u++) {
      // Inverse map: undo the shift, then the rotation and scale about the centre.
      const px = u + 0.5 - centreX - draw.shiftX;
      const py = v + 0.5 - centreY - draw.shiftY;
      const sx = cos * px + sin * py + centreX - 0.5;
      const sy = -sin * px + cos * py + centreY - 0.5;
      const x0 = Math.floor(sx);
      const y0 = Math.floor(sy);
      const fx = sx - x0;
      const fy = sy - y0;
      const top = sample(x0, y0) * (1 - fx) + sample(x0 + 1, y0) * fx;
      const bottom = sample(x0, y0 + 1) * (1 - fx) + sample(x0 + 1, y0 + 1) * fx;
      const level = draw.contrast * (top * (1 - fy) + bottom * fy - 128) + 128 + draw.brightness;
      out[v * width + u] = Math.min(255, Math.max(0, Math.round(level)));
    }
  }
  return { width, height, data: out };
}

/**
 * `copies` augmented copies of every window, in order (all copies of window 0, then of
 * window 1, …), each with its own draw from `random` (a seeded generator, e.g.
 * seedrandom(`${seed}:augment`)), so the same seed gives the same copies. The inputs are not
 * changed and not included.
 * @throws RectboostError `invalid-option` when copies is not an integer in [0, 100] or a limit is out of range.
 * @example augmentWindows(positives, 2, seedrandom('1:augment'))
 */
export function augmentWindows(windows: readonly GrayImage[], copies: number, random: () => number, limits: AugmentationLimits = DEFAULT_AUGMENTATION): GrayImage[] {
  checkInteger('augmented copies', copies, 0, 100);
  checkNumber('augmentation shift share', limits.shiftShare, 0, 0.5);
  checkNumber('augmentation scale', limits.maxScale, 1, 4);
  checkNumber('augmentation rotation', limits.maxRotationDegrees, 0, 180);
  checkNumber('augmentation contrast', limits.maxContrast, 1, 16);
  checkNumber('augmentation brightness', limits.maxBrightness, 0, 255);
  const out: GrayImage[] = [];
  for (const window of windows) {
    for (let k = 0; k < copies; k++) out.push(applyAugmentation(window, drawAugmentation(random, window.width, window.height, limits)));
  }
  return out;
}
