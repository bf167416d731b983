import { RectboostError } from '../errors.js';
import type { IntegralImage } from '../image/integral-image.js';
import { SCAN_KERNEL_BASE64 } from './scan-kernel-binary.js';

/**
 * One scale of a cascade compiled to flat typed arrays: every weak classifier's
 * rescaled rectangles merged into corner reads over the image's integral table
 * (offsets in table entries, relative to the window's top-left entry).
 */
export interface ScaledCascade {
  readonly scale: number;
  readonly windowWidth: number;
  readonly windowHeight: number;
  /** Window shift in pixels. */
  readonly step: number;
  readonly stageEnds: Int32Array;
  readonly thresholds: Float64Array;
  readonly weakEnds: Int32Array;
  readonly splitValues: Float64Array;
  readonly belowOutputs: Float64Array;
  readonly aboveOutputs: Float64Array;
  readonly offsets: Int32Array;
  readonly coefficients: Float64Array;
}

// The parts of WebAssembly.Memory and WebAssembly.Global used here, named
// locally so that emitted declarations need no WebAssembly types.
interface KernelMemory {
  readonly buffer: ArrayBuffer;
  grow(pages: number): number;
}
interface KernelGlobal {
  value: number;
}

/** The exports of scan-kernel.wat: its memory, scanRow and the globals that describe the layout (addresses in bytes). */
interface KernelExports {
  readonly memory: KernelMemory;
  scanRow(firstWindow: number, lastWindow: number, step: number): number;
  readonly sumAt: KernelGlobal;
  readonly squaredDistance: KernelGlobal;
  readonly windowsAt: KernelGlobal;
  readonly inverseDeviationsAt: KernelGlobal;
  readonly scoresAt: KernelGlobal;
  readonly tallyAt: KernelGlobal;
  readonly stageCount: KernelGlobal;
  readonly stageEndsAt: KernelGlobal;
  readonly thresholdsAt: KernelGlobal;
  readonly weakEndsAt: KernelGlobal;
  readonly splitValuesAt: KernelGlobal;
  readonly belowOutputsAt: KernelGlobal;
  readonly aboveOutputsAt: KernelGlobal;
  readonly offsetsAt: KernelGlobal;
  readonly coefficientsAt: KernelGlobal;
  readonly bottomRight: KernelGlobal;
  readonly bottomLeft: KernelGlobal;
  readonly topRight: KernelGlobal;
  readonly inverseCount: KernelGlobal;
  readonly flatVariance: KernelGlobal;
}

// Tally slots (f64) that scanRow adds to; rejections by stage k go to TALLY_REJECTED + k.
export const TALLY_WINDOWS = 0;
export const TALLY_FLAT = 1;
export const TALLY_FEATURES = 2;
export const TALLY_ACCEPTED = 3;
export const TALLY_REJECTED = 4;

const PAGE_BYTES = 65536;
// WebAssembly memory is 32-bit: at most 65,536 pages of 64 KiB.
const MAX_PAGES = 65536;
// An instance whose memory grew past this for one image is dropped after it,
// so that one huge image does not keep a gigabyte alive for the whole run.
const KEEP_INSTANCE_BYTES = 256 * 1024 * 1024;

let compiledModule: WebAssembly.Module | undefined;
let sharedExports: KernelExports | undefined;

function kernelModule(): WebAssembly.Module {
  compiledModule ??= new WebAssembly.Module(Uint8Array.from(atob(SCAN_KERNEL_BASE64), (character) => character.charCodeAt(0)));
  return compiledModule;
}

function align(address: number, bytes: number): number {
  return Math.ceil(address / bytes) * bytes;
}

/**
 * Sizes of the cascade arrays that the memory layout must hold: the largest
 * over the scales of one image (merging corners can change their count).
 */
export interface CascadeCapacity {
  readonly stages: number;
  readonly weakClassifiers: number;
  readonly corners: number;
}

/**
 * The scan kernel of this thread with one image loaded: the integral tables
 * copied into WebAssembly memory, room for the cascade at any of its scales,
 * and a live-window list as wide as the widest row.
 *
 * Use: `const image = loadImageIntoKernel(...)`, then for each scale
 * `image.setScale(compiled)` and `image.scanRow(...)` per row; `image.release()` at the end.
 */
export class KernelImage {
  private readonly exports: KernelExports;
  private readonly sumAt: number;
  private readonly stride: number;
  private readonly stageCapacity: number;
  private readonly layout: { stageEnds: number; thresholds: number; weakEnds: number; splitValues: number; belowOutputs: number; aboveOutputs: number; offsets: number; coefficients: number };

  constructor(exports: KernelExports, integral: IntegralImage, capacity: CascadeCapacity, columns: number) {
    this.exports = exports;
    this.stride = integral.stride;
    this.stageCapacity = capacity.stages;
    let at = 0;
    const take = (bytes: number): number => {
      const start = align(at, 16);
      at = start + bytes;
      return start;
    };
    const tallyAt = take(8 * (TALLY_REJECTED + capacity.stages));
    this.layout = {
      stageEnds: take(4 * capacity.stages),
      thresholds: take(8 * capacity.stages),
      weakEnds: take(4 * capacity.weakClassifiers),
      splitValues: take(8 * capacity.weakClassifiers),
      belowOutputs: take(8 * capacity.weakClassifiers),
      aboveOutputs: take(8 * capacity.weakClassifiers),
      offsets: take(4 * capacity.corners),
      coefficients: take(8 * capacity.corners),
    };
    // One spare slot (the kernel repeats the last window there) and one for a pair's second lane.
    const listSlots = columns + 2;
    const windowsAt = take(4 * listSlots);
    const inverseDeviationsAt = take(8 * listSlots);
    const scoresAt = take(8 * listSlots);
    const entries = integral.sum.length;
    this.sumAt = take(8 * entries);
    const squaredAt = take(8 * entries);
    const needed = at;
    const pages = Math.ceil(needed / PAGE_BYTES);
    if (pages > MAX_PAGES) {
      throw new RectboostError('bad-image', `A ${integral.width}×${integral.height} image needs ${needed} bytes of scan memory, above WebAssembly's 4 GiB; shrink it.`);
    }
    const memory = exports.memory;
    const havePages = memory.buffer.byteLength / PAGE_BYTES;
    if (pages > havePages) memory.grow(pages - havePages);
    const buffer = memory.buffer;
    new Float64Array(buffer, this.sumAt, entries).set(integral.sum);
    new Float64Array(buffer, squaredAt, entries).set(integral.squaredSum);
    new Float64Array(buffer, tallyAt, TALLY_REJECTED + capacity.stages).fill(0);
    exports.sumAt.value = this.sumAt;
    exports.squaredDistance.value = squaredAt - this.sumAt;
    exports.windowsAt.value = windowsAt;
    exports.inverseDeviationsAt.value = inverseDeviationsAt;
    exports.scoresAt.value = scoresAt;
    exports.tallyAt.value = tallyAt;
    exports.stageEndsAt.value = this.layout.stageEnds;
    exports.thresholdsAt.value = this.layout.thresholds;
    exports.weakEndsAt.value = this.layout.weakEnds;
    exports.splitValuesAt.value = this.layout.splitValues;
    exports.belowOutputsAt.value = this.layout.belowOutputs;
    exports.aboveOutputsAt.value = this.layout.aboveOutputs;
    exports.offsetsAt.value = this.layout.offsets;
    exports.coefficientsAt.value = this.layout.coefficients;
  }

  /** Writes the cascade compiled for one scale (it must fit the capacity given at load). */
  setScale(c: ScaledCascade, flatVariance: number): void {
    const buffer = this.exports.memory.buffer;
    const { layout, exports, stride } = this;
    new Int32Array(buffer, layout.stageEnds, c.stageEnds.length).set(c.stageEnds);
    new Float64Array(buffer, layout.thresholds, c.thresholds.length).set(c.thresholds);
    new Int32Array(buffer, layout.weakEnds, c.weakEnds.length).set(c.weakEnds);
    new Float64Array(buffer, layout.splitValues, c.splitValues.length).set(c.splitValues);
    new Float64Array(buffer, layout.belowOutputs, c.belowOutputs.length).set(c.belowOutputs);
    new Float64Array(buffer, layout.aboveOutputs, c.aboveOutputs.length).set(c.aboveOutputs);
    const offsets = new Int32Array(buffer, layout.offsets, c.offsets.length);
    for (let k = 0; k < c.offsets.length; k++) offsets[k] = 8 * c.offsets[k]!;
    new Float64Array(buffer, layout.coefficients, c.coefficients.length).set(c.coefficients);
    exports.stageCount.value = c.stageEnds.length;
    exports.bottomRight.value = 8 * (c.windowHeight * stride + c.windowWidth);
    exports.bottomLeft.value = 8 * (c.windowHeight * stride);
    exports.topRight.value = 8 * c.windowWidth;
    exports.inverseCount.value = 1 / (c.windowWidth * c.windowHeight);
    exports.flatVariance.value = flatVariance;
  }

  /**
   * Scans the windows with top-left entries firstEntry, firstEntry + step, … ≤
   * lastEntry (table entries of one row) through every stage; returns how many
   * passed. Read them with acceptedWindows before the next call.
   */
  scanRow(firstEntry: number, lastEntry: number, step: number): number {
    return this.exports.scanRow(this.sumAt + 8 * firstEntry, this.sumAt + 8 * lastEntry, 8 * step);
  }

  /**
   * The first `count` listed windows as views into kernel memory, valid until
   * the next scanRow: each window's sum-table byte address (table entry =
   * (address − tableAddress) / 8) and its score.
   */
  acceptedWindows(count: number): { addresses: Int32Array; tableAddress: number; scores: Float64Array } {
    const buffer = this.exports.memory.buffer;
    return {
      addresses: new Int32Array(buffer, this.exports.windowsAt.value, count),
      tableAddress: this.sumAt,
      scores: new Float64Array(buffer, this.exports.scoresAt.value, count),
    };
  }

  /** The tally: slots TALLY_WINDOWS … TALLY_REJECTED + stage. */
  tally(): Float64Array {
    return new Float64Array(this.exports.memory.buffer, this.exports.tallyAt.value, TALLY_REJECTED + this.stageCapacity).slice();
  }

  /** Lets go of this thread's instance when its memory grew past what is worth keeping. */
  release(): void {
    if (this.exports.memory.buffer.byteLength > KEEP_INSTANCE_BYTES) sharedExports = undefined;
  }
}

/**
 * Loads an image into this thread's scan kernel (one WebAssembly instance per
 * thread, made on first use). Not reentrant: one image at a time per thread,
 * which is how scanImage uses it (it runs to completion synchronously).
 */
export function loadImageIntoKernel(integral: IntegralImage, capacity: CascadeCapacity, columns: number): KernelImage {
  sharedExports ??= new WebAssembly.Instance(kernelModule(), {}).exports as unknown as KernelExports;
  return new KernelImage(sharedExports, integral, capacity, columns);
}
