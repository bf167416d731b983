import { readFile } from 'node:fs/promises';
import sharp from 'sharp';
import { RectboostError } from '../errors.js';
import { DEFAULT_MAX_PIXELS, type GrayImage } from '../image/gray-image.js';

/** Image file endings rectboost reads (lower case). */
export const IMAGE_EXTENSIONS = ['.png', '.jpg', '.jpeg', '.tif', '.tiff', '.webp'] as const;

/** True when the file name ends in one of IMAGE_EXTENSIONS (any case). */
export function hasImageExtension(path: string): boolean {
  const lower = path.toLowerCase();
  return IMAGE_EXTENSIONS.some((ending) => lower.endsWith(ending));
}

export interface DecodeOptions {
  /** Refuse images with more pixels than this. Default DEFAULT_MAX_PIXELS (2^26). */
  readonly maxPixels?: number;
}

/**
 * Reads a PNG, JPEG, TIFF or WebP file and converts it to 8-bit gray
 * (sharp's luminance conversion; alpha is dropped).
 * @throws RectboostError `bad-image` naming the file when it is missing, empty,
 *   not an image, corrupt or truncated, or above `maxPixels`.
 */
export async function decodeGrayImageFile(path: string, options: DecodeOptions = {}): Promise<GrayImage> {
  let bytes: Buffer;
  try {
    bytes = await readFile(path);
  } catch (error) {
    const reason = (error as NodeJS.ErrnoException).code === 'ENOENT' ? 'does not exist' : 'cannot be read';
    throw new RectboostError('bad-image', `Image ${path} ${reason}.`, { cause: error });
  }
  return decodeGrayImageBytes(bytes, path, options);
}

/**
 * Decodes image bytes; `label` names the source in error messages.
 * @throws RectboostError `bad-image` as decodeGrayImageFile.
 */
export async function decodeGrayImageBytes(bytes: Uint8Array, label: string, options: DecodeOptions = {}): Promise<GrayImage> {
  const maxPixels = options.maxPixels ?? DEFAULT_MAX_PIXELS;
  if (bytes.length === 0) {
    throw new RectboostError('bad-image', `Image ${label} is an empty file (0 bytes).`);
  }
  let width: number;
  let height: number;
  try {
    const metadata = await sharp(bytes, { failOn: 'error', limitInputPixels: false }).metadata();
    width = metadata.width ?? 0;
    height = metadata.height ?? 0;
  } catch (error) {
    throw new RectboostError('bad-image', `Image ${label} is not a readable PNG, JPEG, TIFF or WebP file (${firstLine(error)}).`, { cause: error });
  }
  if (width < 1 || height < 1) {
    throw new RectboostError('bad-image', `Image ${label} has no pixels.`);
  }
  if (width * height > maxPixels) {
    throw new RectboostError(
      'bad-image',
      `Image ${label} is ${width}×${height} = ${width * height} pixels, above the limit of ${maxPixels}; shrink it or raise the limit.`,
    );
  }
  try {
    const { data, info } = await sharp(bytes, { failOn: 'error', limitInputPixels: maxPixels })
      .greyscale()
      .removeAlpha()
      .extractChannel(0)
      .raw()
      .toBuffer({ resolveWithObject: true });
    if (info.width !== width || info.height !== height || data.length !== width * height) {
      throw new Error(`decoded ${info.width}×${info.height}×${info.channels}, expected ${width}×${height}×1`);
    }
    return { width, height, data: new Uint8Array(data.buffer, data.byteOffset, data.length) };
  } catch (error) {
    throw new RectboostError('bad-image', `Image ${label} is corrupt or truncated (${firstLine(error)}).`, { cause: error });
  }
}

function firstLine(error: unknown): string {
  const text = error instanceof Error ? error.message : String(error);
  return text.split('\n')[0]!.trim();
}
