import { cropGrayImage, resizeGrayImage, type GrayImage } from '../image/gray-image.js';
import { detectorCascadeFromModel, type DetectorCascade } from '../detect/detector-cascade.js';
import { WindowListEvaluator } from '../detect/window-list.js';
import { computeIntegralImage, type IntegralImage, type IntegralImageOptions } from '../image/integral-image.js';
import type { CascadeModel } from './cascade-model.js';

/**
 * One level of a background image pyramid: the image shrunk by `scale`, scanned
 * with the detector window at scale 1. A window here is a background window of
 * side windowWidth·scale in the original image.
 */
interface PyramidSheet {
  readonly imageIndex: number;
  readonly scale: number;
  readonly width: number;
  readonly height: number;
  /** Window positions: (width − W + 1) × (height − H + 1). */
  readonly positions: number;
}

/** Ratio between pyramid levels of background images (common practice for mining: 1.25). */
export const MINING_SCALE_STEP = 1.25;

/** Windows visited from one sheet before moving on, so negatives come from every image and scale. */
const VISIT_CHUNK = 256;

/**
 * Background images as a searchable set of windows at every position and scale:
 * every image is shrunk by 1.25^k while the detector window still fits.
 * Level images are built lazily and cached up to a byte budget (one byte a pixel, so
 * the whole pyramid of most background sets fits). Integral tables (16 bytes a pixel)
 * are not cached: mining builds one per sheet when it evaluates the sheet, which costs
 * far less than the evaluation, and a cache of them was the largest memory of a
 * training run after the response table (about 0.5 GB for 60 images of 560×560).
 * With `tableOptions.rotated` the tables hold the rotated part too, for tilted features.
 */
export class BackgroundWindows {
  readonly sheets: readonly PyramidSheet[];
  /** Total number of windows over all sheets. */
  readonly totalWindows: number;
  private readonly cumulative: Float64Array;
  private readonly cache = new Map<number, GrayImage>();
  private cachedBytes = 0;

  constructor(
    private readonly images: readonly GrayImage[],
    readonly windowWidth: number,
    readonly windowHeight: number,
    private readonly cacheBudgetBytes = 256 * 1024 ** 2,
    /** `{ rotated: true }` for cascades with tilted features (the extended set). */
    private readonly tableOptions: IntegralImageOptions = {},
  ) {
    const sheets: PyramidSheet[] = [];
    images.forEach((image, imageIndex) => {
      for (let level = 0; ; level++) {
        const scale = MINING_SCALE_STEP ** level;
        const width = Math.floor(image.width / scale);
        const height = Math.floor(image.height / scale);
        if (width < windowWidth || height < windowHeight) break;
        sheets.push({ imageIndex, scale, width, height, positions: (width - windowWidth + 1) * (height - windowHeight + 1) });
      }
    });
    this.sheets = sheets;
    this.cumulative = new Float64Array(sheets.length + 1);
    sheets.forEach((sheet, i) => {
      this.cumulative[i + 1] = this.cumulative[i]! + sheet.positions;
    });
    this.totalWindows = this.cumulative[sheets.length]!;
  }

  /** Level image of a sheet (built on first use, cached within budget; the source image itself at level 0). */
  level(sheetIndex: number): GrayImage {
    const hit = this.cache.get(sheetIndex);
    if (hit !== undefined) {
      // Refresh its place for least-recently-used eviction.
      this.cache.delete(sheetIndex);
      this.cache.set(sheetIndex, hit);
      return hit;
    }
    const sheet = this.sheets[sheetIndex]!;
    const source = this.images[sheet.imageIndex]!;
    if (sheet.scale === 1) return source;
    const image = resizeGrayImage(source, sheet.width, sheet.height);
    const bytes = image.width * image.height;
    while (this.cachedBytes + bytes > this.cacheBudgetBytes && this.cache.size > 0) {
      const oldest = this.cache.keys().next().value as number;
      this.cachedBytes -= this.cache.get(oldest)!.data.length;
      this.cache.delete(oldest);
    }
    this.cache.set(sheetIndex, image);
    this.cachedBytes += bytes;
    return image;
  }

  /** A fresh integral table of a sheet's level image (not cached; see the class comment). */
  integral(sheetIndex: number): IntegralImage {
    return computeIntegralImage(this.level(sheetIndex), this.tableOptions);
  }

  /** Sheet index and position of a global window index in [0, totalWindows). */
  locate(globalIndex: number): { sheetIndex: number; position: number } {
    let low = 0;
    let high = this.sheets.length - 1;
    while (low < high) {
      const middle = (low + high + 1) >> 1;
      if (this.cumulative[middle]! <= globalIndex) low = middle;
      else high = middle - 1;
    }
    return { sheetIndex: low, position: globalIndex - this.cumulative[low]! };
  }

  /** The window at a position of a sheet, as a windowWidth × windowHeight patch. */
  crop(sheetIndex: number, position: number): GrayImage {
    const image = this.level(sheetIndex);
    const columns = image.width - this.windowWidth + 1;
    return cropGrayImage(image, position % columns, Math.floor(position / columns), this.windowWidth, this.windowHeight);
  }
}

/** Result of one mining run. */
export interface MiningResult {
  readonly negatives: GrayImage[];
  /** Background windows looked at, in the seeded order, until the last negative was found. */
  readonly windowsScanned: number;
  /** Windows the kernel evaluated (at least windowsScanned: batches run ahead of the walk). */
  readonly windowsEvaluated?: number;
  /** Seconds spent evaluating them (this thread). */
  readonly evaluationSeconds?: number;
  /** True when every background window was visited before `wanted` were found. */
  readonly exhausted: boolean;
}

/** Progress callback of mining: negatives found so far and windows scanned. */
export type MiningProgress = (found: number, scanned: number) => void;

/**
 * Stage-1 negatives: `wanted` windows drawn uniformly without replacement over
 * every position and scale of the backgrounds (each window equally likely).
 */
export function sampleUniformNegatives(backgrounds: BackgroundWindows, wanted: number, random: () => number): MiningResult {
  const total = backgrounds.totalWindows;
  const take = Math.min(wanted, total);
  const chosen = new Set<number>();
  const order: number[] = [];
  // Rejection of repeats is cheap while take ≪ total; past half, fall back to a partial shuffle.
  if (take <= total / 2) {
    while (order.length < take) {
      const index = Math.floor(random() * total);
      if (!chosen.has(index)) {
        chosen.add(index);
        order.push(index);
      }
    }
  } else {
    const all = Array.from({ length: total }, (_, i) => i);
    for (let i = 0; i < take; i++) {
      const j = i + Math.floor(random() * (total - i));
      [all[i], all[j]] = [all[j]!, all[i]!];
      order.push(all[i]!);
    }
  }
  const negatives = order.map((index) => {
    const { sheetIndex, position } = backgrounds.locate(index);
    return backgrounds.crop(sheetIndex, position);
  });
  return { negatives, windowsScanned: take, exhausted: take < wanted };
}

/** A sheet's walk through its positions, and the kernel's verdicts on the sheet's windows. */
interface Walk {
  readonly sheetIndex: number;
  readonly n: number;
  readonly multiplier: number;
  readonly offset: number;
  visited: number;
  /** accepted[position] is 1 when the cascade accepts that window; made when the walk first needs it. */
  accepted: Uint8Array | undefined;
}

/**
 * Hard negatives for the next stage: background windows that the cascade so
 * far still accepts (Viola & Jones 2001 §5.2). Sheets are visited round-robin in
 * a seeded order, VISIT_CHUNK windows at a time, each sheet walking its
 * positions in a seeded affine permutation (p → (a·p + b) mod n with gcd(a, n) = 1),
 * so every window is visited once and negatives spread over images and scales.
 * `windowsScanned` counts the windows of that order up to the last negative found.
 *
 * The windows are evaluated by the scan kernel in batches of one whole sheet (its
 * row scan, as detection runs it), the first time the walk enters the sheet; the
 * walk then reads the verdicts in its seeded order, so the negatives and the count
 * of windows scanned are those a window-by-window walk would give. A sheet costs
 * one pass even when the walk leaves most of it unvisited (windowsEvaluated), which
 * the row scan's speed pays for many times over.
 * `shouldStop` is polled between chunks (for Ctrl-C).
 */
export function mineHardNegatives(
  backgrounds: BackgroundWindows,
  cascade: Pick<CascadeModel, 'window' | 'stages'>,
  wanted: number,
  random: () => number,
  onProgress?: MiningProgress,
  shouldStop?: () => boolean,
): MiningResult {
  const sheetCount = backgrounds.sheets.length;
  const order = Array.from({ length: sheetCount }, (_, i) => i);
  for (let i = sheetCount - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    [order[i], order[j]] = [order[j]!, order[i]!];
  }
  const walks: Walk[] = order.map((sheetIndex) => {
    const n = backgrounds.sheets[sheetIndex]!.positions;
    let multiplier = 1 + Math.floor(random() * Math.max(1, n - 1));
    while (greatestCommonDivisor(multiplier, n) !== 1) multiplier++;
    return { sheetIndex, n, multiplier, offset: Math.floor(random() * n), visited: 0, accepted: undefined };
  });
  const detector = detectorCascadeFromModel(cascade);
  const negatives: GrayImage[] = [];
  const tally = { evaluated: 0, seconds: 0 };
  let scanned = 0;
  let active = walks.length;
  const result = (exhausted: boolean): MiningResult => ({ negatives, windowsScanned: scanned, windowsEvaluated: tally.evaluated, evaluationSeconds: tally.seconds, exhausted });
  while (negatives.length < wanted && active > 0) {
    active = 0;
    for (const walk of walks) {
      if (walk.visited >= walk.n || negatives.length >= wanted) continue;
      if (shouldStop?.()) return result(false);
      const image = backgrounds.level(walk.sheetIndex);
      const columns = image.width - backgrounds.windowWidth + 1;
      const end = Math.min(walk.n, walk.visited + VISIT_CHUNK);
      walk.accepted ??= evaluateSheet(walk, backgrounds, detector, tally);
      for (; walk.visited < end; walk.visited++) {
        scanned++;
        const position = (walk.multiplier * walk.visited + walk.offset) % walk.n;
        if (walk.accepted[position] === 1) {
          const x = position % columns;
          negatives.push(cropGrayImage(image, x, (position - x) / columns, backgrounds.windowWidth, backgrounds.windowHeight));
          if (negatives.length >= wanted) break;
        }
      }
      if (walk.visited < walk.n) active++;
      onProgress?.(negatives.length, scanned);
    }
  }
  return result(negatives.length < wanted);
}

/** The kernel's verdict on every window of the walk's sheet (detection's row scan at scale 1). */
function evaluateSheet(walk: Walk, backgrounds: BackgroundWindows, detector: DetectorCascade, tally: { evaluated: number; seconds: number }): Uint8Array {
  const integral = backgrounds.integral(walk.sheetIndex);
  const started = performance.now();
  const accepted = new Uint8Array(walk.n);
  const evaluator = new WindowListEvaluator(detector, integral, 1);
  try {
    evaluator.acceptEveryWindow(accepted);
  } finally {
    evaluator.release();
  }
  tally.evaluated += walk.n;
  tally.seconds += (performance.now() - started) / 1000;
  return accepted;
}

function greatestCommonDivisor(a: number, b: number): number {
  while (b !== 0) [a, b] = [b, a % b];
  return a;
}
