import { RectboostError } from '../errors.js';
import type { IntegralImage } from '../image/integral-image.js';
import { MAX_TREE_DEPTH } from '../model/cascade-model.js';
import { SCAN_KERNEL_BASE64 } from './scan-kernel-binary.js';

/**
 * One scale of a cascade compiled to flat typed arrays: every split's rescaled
 * rectangles merged into corner reads over the image's integral table (offsets in
 * table entries, relative to the window's top-left entry). The per-record arrays
 * (weakEnds … nodePlaces) have one entry per node record: one for a stump, 2^d − 1
 * for a tree of depth d (compileCascadeAtScale); stageEnds counts node records.
 */
export interface ScaledCascade {
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
  /** Each record's place in its tree: (split count << 16) | heap index (nodePlace). */
  readonly nodePlaces: Int32Array;
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
  readonly squaredDistance: KernelGlobal;
  readonly windowsAt: KernelGlobal;
  readonly inverseDeviationsAt: KernelGlobal;
  readonly scoresAt: KernelGlobal;
  readonly tallyAt: KernelGlobal;
  readonly stageCount: KernelGlobal;
  readonly stagesAt: KernelGlobal;
  readonly weaksAt: KernelGlobal;
  readonly cornersAt: KernelGlobal;
  readonly treeScratchAt: KernelGlobal;
  readonly bottomRight: KernelGlobal;
  readonly bottomLeft: KernelGlobal;
  readonly topRight: KernelGlobal;
  readonly inverseCount: KernelGlobal;
  readonly flatVariance: KernelGlobal;
  readonly presetCount: KernelGlobal;
  readonly keepAll: KernelGlobal;
}

// Record sizes of scan-kernel.wat's cascade layout, in bytes.
const STAGE_RECORD = 16;
const WEAK_RECORD = 32;
const CORNER_RECORD = 16;
// The tree scratch: per heap index of a tree's splits, the path masks of four windows (32 bytes).
const TREE_SCRATCH = 32 * 2 ** MAX_TREE_DEPTH;

// Tally slots (f64) that scanRow adds to; rejections by stage k go to TALLY_REJECTED + k.
export const TALLY_WINDOWS = 0;
export const TALLY_FLAT = 1;
export const TALLY_FEATURES = 2;
export const TALLY_ACCEPTED = 3;
export const TALLY_REJECTED = 4;

const PAGE_BYTES = 65536;
const TABLE_PADDING = 32;
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
  private readonly stagesAt: number;
  private readonly weaksAt: number;
  private readonly cornersAt: number;
  private readonly listSlots: number;
  private scale: ScaledCascade | undefined;

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
    this.stagesAt = take(STAGE_RECORD * capacity.stages);
    this.weaksAt = take(WEAK_RECORD * capacity.weakClassifiers);
    this.cornersAt = take(CORNER_RECORD * capacity.corners);
    const treeScratchAt = take(TREE_SCRATCH);
    // Past the widest row, the kernel needs three spare slots (it reads windows four at a time).
    const listSlots = columns + 4;
    this.listSlots = listSlots;
    const windowsAt = take(4 * listSlots);
    const inverseDeviationsAt = take(8 * listSlots);
    const scoresAt = take(8 * listSlots);
    const entries = integral.sum.length;
    this.sumAt = take(8 * entries);
    // Four adjacent windows at the end of the last row read up to three entries
    // past the table (their lanes are dropped): the padding keeps that in memory.
    // (with the rotated table in `sum`, the squared table is only the upright size)
    const squaredEntries = integral.rotatedAt === undefined ? entries : integral.squaredSum.length;
    const squaredAt = take(8 * squaredEntries + TABLE_PADDING);
    const needed = at;
    const pages = Math.ceil(needed / PAGE_BYTES);
    if (pages > MAX_PAGES) {
      throw new RectboostError('bad-image', `A ${integral.width}×${integral.height} image needs ${needed} bytes of scan memory, above WebAssembly's 4 GiB; shrink it.`);
    }
    const memory = exports.memory;
    const havePages = memory.buffer.byteLength / PAGE_BYTES;
    if (pages > havePages) {
      try {
        memory.grow(pages - havePages);
      } catch (error) {
        throw new RectboostError('bad-image', `A ${integral.width}×${integral.height} image needs ${needed} bytes of scan memory, which could not be had (${(error as Error).message}); shrink it.`, { cause: error });
      }
    }
    const buffer = memory.buffer;
    new Float64Array(buffer, this.sumAt, entries).set(integral.sum);
    // (a window-list table may come without squared sums: lists carry their own 1/σ)
    new Float64Array(buffer, squaredAt, integral.squaredSum.length).set(integral.squaredSum);
    new Float64Array(buffer, tallyAt, TALLY_REJECTED + capacity.stages).fill(0);
    exports.squaredDistance.value = squaredAt - this.sumAt;
    exports.windowsAt.value = windowsAt;
    exports.inverseDeviationsAt.value = inverseDeviationsAt;
    exports.scoresAt.value = scoresAt;
    exports.tallyAt.value = tallyAt;
    exports.stagesAt.value = this.stagesAt;
    exports.weaksAt.value = this.weaksAt;
    exports.cornersAt.value = this.cornersAt;
    exports.treeScratchAt.value = treeScratchAt;
    exports.presetCount.value = -1;
    exports.keepAll.value = 0;
  }

  /** Writes the cascade compiled for one scale as the kernel's records (it must fit the capacity given at load). */
  setScale(c: ScaledCascade, flatVariance: number): void {
    const buffer = this.exports.memory.buffer;
    const { exports, stride } = this;
    const stageCount = c.stageEnds.length;
    const weakCount = c.weakEnds.length;
    const cornerCount = c.offsets.length;
    const stageFloats = new Float64Array(buffer, this.stagesAt, (STAGE_RECORD / 8) * stageCount);
    const stageInts = new Int32Array(buffer, this.stagesAt, (STAGE_RECORD / 4) * stageCount);
    for (let k = 0; k < stageCount; k++) {
      stageFloats[2 * k] = c.thresholds[k]!;
      stageInts[4 * k + 2] = this.weaksAt + WEAK_RECORD * c.stageEnds[k]!;
    }
    const weakFloats = new Float64Array(buffer, this.weaksAt, (WEAK_RECORD / 8) * weakCount);
    const weakInts = new Int32Array(buffer, this.weaksAt, (WEAK_RECORD / 4) * weakCount);
    for (let w = 0; w < weakCount; w++) {
      weakFloats[4 * w] = c.splitValues[w]!;
      weakFloats[4 * w + 1] = c.belowOutputs[w]!;
      weakFloats[4 * w + 2] = c.aboveOutputs[w]!;
      weakInts[8 * w + 6] = this.cornersAt + CORNER_RECORD * c.weakEnds[w]!;
      weakInts[8 * w + 7] = c.nodePlaces[w]!;
    }
    const cornerFloats = new Float64Array(buffer, this.cornersAt, (CORNER_RECORD / 8) * cornerCount);
    const cornerInts = new Int32Array(buffer, this.cornersAt, (CORNER_RECORD / 4) * cornerCount);
    for (let k = 0; k < cornerCount; k++) {
      cornerInts[4 * k] = 8 * c.offsets[k]!;
      cornerFloats[2 * k + 1] = c.coefficients[k]!;
    }
    exports.stageCount.value = stageCount;
    exports.bottomRight.value = 8 * (c.windowHeight * stride + c.windowWidth);
    exports.bottomLeft.value = 8 * (c.windowHeight * stride);
    exports.topRight.value = 8 * c.windowWidth;
    exports.inverseCount.value = 1 / (c.windowWidth * c.windowHeight);
    exports.flatVariance.value = flatVariance;
    this.scale = c;
  }

  /**
   * Evaluates a list of windows at the scale set last: window i has its top-left at
   * table entry `entries[i]` and 1/σ `inverseDeviations[i]` (non-zero: flat windows
   * are the caller's to leave out, see inverseStandardDeviation), and it goes through
   * stages fromStage … toStage − 1 with the arithmetic of scanRow. Returns how many
   * passed; acceptedWindows lists them in list order with their margins. With
   * `keepAll` every window is kept (count is returned unchanged) and its score is
   * the margin of stage toStage − 1 even when negative, for callers that need the
   * score of each stage.
   */
  scanList(entries: ArrayLike<number>, inverseDeviations: ArrayLike<number>, count: number, fromStage: number, toStage: number, keepAll: boolean): number {
    const c = this.scale;
    if (c === undefined) throw new RectboostError('invalid-option', 'scanList needs a scale: call setScale first.');
    if (count > this.listSlots - 4) {
      throw new RectboostError('invalid-option', `A window list of ${count} does not fit the ${this.listSlots - 4} slots this image was loaded with; load it with more columns.`);
    }
    const { exports } = this;
    const buffer = exports.memory.buffer;
    const addresses = new Uint32Array(buffer, exports.windowsAt.value, count);
    const inverses = new Float64Array(buffer, exports.inverseDeviationsAt.value, count);
    for (let i = 0; i < count; i++) {
      addresses[i] = this.sumAt + 8 * entries[i]!;
      inverses[i] = inverseDeviations[i]!;
    }
    const firstWeak = fromStage === 0 ? 0 : c.stageEnds[fromStage - 1]!;
    const firstCorner = firstWeak === 0 ? 0 : c.weakEnds[firstWeak - 1]!;
    exports.stagesAt.value = this.stagesAt + STAGE_RECORD * fromStage;
    exports.weaksAt.value = this.weaksAt + WEAK_RECORD * firstWeak;
    exports.cornersAt.value = this.cornersAt + CORNER_RECORD * firstCorner;
    exports.stageCount.value = toStage - fromStage;
    exports.presetCount.value = count;
    exports.keepAll.value = keepAll ? 1 : 0;
    try {
      return exports.scanRow(this.sumAt, this.sumAt, 8);
    } finally {
      exports.presetCount.value = -1;
      exports.keepAll.value = 0;
      exports.stagesAt.value = this.stagesAt;
      exports.weaksAt.value = this.weaksAt;
      exports.cornersAt.value = this.cornersAt;
      exports.stageCount.value = c.stageEnds.length;
    }
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
  acceptedWindows(count: number): { addresses: Uint32Array; tableAddress: number; scores: Float64Array } {
    const buffer = this.exports.memory.buffer;
    return {
      // unsigned: addresses above 2 GiB are valid in WebAssembly's 32-bit memory
      addresses: new Uint32Array(buffer, this.exports.windowsAt.value, count),
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
