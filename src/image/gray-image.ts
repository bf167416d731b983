import { checkInteger, checkThat } from '../check.js';

/**
 * An 8-bit grayscale image, row-major: pixel (x, y) is `data[y * width + x]`.
 * Coordinates everywhere in rectboost are x, y, width, height, with
 * rectangles half-open: {x, y, width, height} covers columns x..x+width-1.
 */
export interface GrayImage {
  readonly width: number;
  readonly height: number;
  readonly data: Uint8Array;
}

/**
 * The largest image rectboost accepts by default: 2^26 pixels (8192 × 8192).
 * Integral images stay exact up to this size (see computeIntegralImage).
 */
export const DEFAULT_MAX_PIXELS = 2 ** 26;

/**
 * Wraps pixel data as a GrayImage after checking its shape.
 * @throws RectboostError `invalid-option` when width/height are not positive
 *   integers or `data.length !== width * height`.
 * @example createGrayImage(2, 1, new Uint8Array([0, 255]))
 */
export function createGrayImage(width: number, height: number, data?: Uint8Array): GrayImage {
  checkInteger('image width', width, 1, DEFAULT_MAX_PIXELS);
  checkInteger('image height', height, 1, DEFAULT_MAX_PIXELS);
  checkThat(width * height <= DEFAULT_MAX_PIXELS, `An image of ${width}×${height} pixels is above the limit of ${DEFAULT_MAX_PIXELS} pixels.`);
  const pixels = data ?? new Uint8Array(width * height);
  checkThat(
    pixels.length === width * height,
    `Image data must hold width × height = ${width * height} pixels; it holds ${pixels.length}.`,
  );
  return { width, height, data: pixels };
}

/**
 * Copies the rectangle {x, y, width, height} of `image` into a new image.
 * @throws RectboostError `invalid-option` when the rectangle leaves the image.
 */
export function cropGrayImage(image: GrayImage, x: number, y: number, width: number, height: number): GrayImage {
  checkThat(
    Number.isInteger(x) && Number.isInteger(y) && Number.isInteger(width) && Number.isInteger(height) &&
      x >= 0 && y >= 0 && width >= 1 && height >= 1 && x + width <= image.width && y + height <= image.height,
    `Crop {x: ${x}, y: ${y}, width: ${width}, height: ${height}} must lie inside the ${image.width}×${image.height} image.`,
  );
  const out = new Uint8Array(width * height);
  for (let row = 0; row < height; row++) {
    const start = (y + row) * image.width + x;
    out.set(image.data.subarray(start, start + width), row * width);
  }
  return { width, height, data: out };
}

/**
 * The box [x, y, width, height] of `image` (any real numbers, e.g. a detection or an
 * annotation) as a `windowWidth` × `windowHeight` patch: edges rounded to whole pixels,
 * clipped to the image, then resized (resizeGrayImage). Undefined when less than one
 * pixel of the box lies inside the image. Used for annotated positives and for the crops
 * of false alarms and missed objects, so both frame a box the same way.
 * @example cropBoxToWindow(scene, [10.4, 20.6, 33, 33], 24, 24)
 */
export function cropBoxToWindow(
  image: GrayImage,
  box: readonly [number, number, number, number],
  windowWidth: number,
  windowHeight: number,
): GrayImage | undefined {
  const [x, y, width, height] = box;
  const left = Math.max(0, Math.round(x));
  const top = Math.max(0, Math.round(y));
  const right = Math.min(image.width, Math.round(x + width));
  const bottom = Math.min(image.height, Math.round(y + height));
  if (!(right - left >= 1 && bottom - top >= 1)) return undefined;
  return resizeGrayImage(cropGrayImage(image, left, top, right - left, bottom - top), windowWidth, windowHeight);
}

/** A new image mirrored left to right. */
export function mirrorGrayImage(image: GrayImage): GrayImage {
  const { width, height, data } = image;
  const out = new Uint8Array(width * height);
  for (let y = 0; y < height; y++) {
    const row = y * width;
    for (let x = 0; x < width; x++) out[row + x] = data[row + width - 1 - x]!;
  }
  return { width, height, data: out };
}

/**
 * Resizes by bilinear sampling of pixel centres (box-averaged first when shrinking
 * by more than 2×, so that small patches are not aliased). Pure; used to bring
 * crops to the detector window.
 */
export function resizeGrayImage(image: GrayImage, width: number, height: number): GrayImage {
  checkInteger('target width', width, 1, DEFAULT_MAX_PIXELS);
  checkInteger('target height', height, 1, DEFAULT_MAX_PIXELS);
  if (width === image.width && height === image.height) {
    return { width, height, data: image.data.slice() };
  }
  let source = image;
  // Halve with a 2×2 box until within 2× of the target: keeps bilinear sampling from skipping pixels.
  while (source.width >= 2 * width * 2 && source.height >= 2 * height * 2) source = halve(source);
  const out = new Uint8Array(width * height);
  const scaleX = source.width / width;
  const scaleY = source.height / height;
  for (let y = 0; y < height; y++) {
    const sy = Math.min(Math.max((y + 0.5) * scaleY - 0.5, 0), source.height - 1);
    const y0 = Math.floor(sy);
    const y1 = Math.min(y0 + 1, source.height - 1);
    const fy = sy - y0;
    for (let x = 0; x < width; x++) {
      const sx = Math.min(Math.max((x + 0.5) * scaleX - 0.5, 0), source.width - 1);
      const x0 = Math.floor(sx);
      const x1 = Math.min(x0 + 1, source.width - 1);
      const fx = sx - x0;
      const d = source.data;
      const top = d[y0 * source.width + x0]! * (1 - fx) + d[y0 * source.width + x1]! * fx;
      const bottom = d[y1 * source.width + x0]! * (1 - fx) + d[y1 * source.width + x1]! * fx;
      out[y * width + x] = Math.round(top * (1 - fy) + bottom * fy);
    }
  }
  return { width, height, data: out };
}

function halve(image: GrayImage): GrayImage {
  const width = Math.floor(image.width / 2);
  const height = Math.floor(image.height / 2);
  const out = new Uint8Array(width * height);
  const d = image.data;
  const w = image.width;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = 2 * y * w + 2 * x;
      out[y * width + x] = (d[i]! + d[i + 1]! + d[i + w]! + d[i + w + 1]! + 2) >> 2;
    }
  }
  return { width, height, data: out };
}
