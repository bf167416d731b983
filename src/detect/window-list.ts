import type { WindowSamples } from '../features/window-samples.js';
import type { IntegralImage } from '../image/integral-image.js';
import { FLAT_WINDOW_VARIANCE } from '../image/window-statistics.js';
import { compileCascadeAtScale } from './compiled-cascade.js';
import type { DetectorCascade, DetectorStage } from './detector-cascade.js';
import { loadImageIntoKernel, type KernelImage } from './scan-kernel.js';

/**
 * The scan kernel over lists of windows at scale 1: training's acceptance of its
 * samples, negative mining, retuning, patch evaluation and stage validation all
 * evaluate through here, so their decisions and scores are the bits detection
 * computes for the same windows (the kernel's order of arithmetic, stated on scanImage).
 *
 * A window is named by the table entry of its top-left corner and carries its 1/σ
 * from inverseStandardDeviation; flat windows (1/σ = 0) are the caller's to leave
 * out: they pass no stage of a non-empty cascade, everywhere.
 *
 * Use: open, evaluate any number of lists, release. One per thread at a time (the
 * thread's kernel holds one table).
 */
export class WindowListEvaluator {
  private readonly kernel: KernelImage;
  private readonly table: IntegralImage;
  private readonly windowWidth: number;
  private readonly windowHeight: number;
  readonly stageCount: number;

  /**
   * Loads `table` (an integral image, or sample tables laid end to end with
   * sampleTable) and the cascade compiled for its stride. Lists may hold up to
   * `listCapacity` windows.
   */
  constructor(cascade: DetectorCascade, table: IntegralImage, listCapacity: number) {
    const compiled = compileCascadeAtScale(cascade, 1, table.stride, 1, table.rotatedAt);
    this.stageCount = cascade.stages.length;
    this.table = table;
    this.windowWidth = cascade.windowWidth;
    this.windowHeight = cascade.windowHeight;
    this.kernel = loadImageIntoKernel(
      table,
      { stages: compiled.stageEnds.length, weakClassifiers: compiled.weakEnds.length, corners: compiled.offsets.length },
      Math.max(1, listCapacity, table.width - cascade.windowWidth + 1),
    );
    this.kernel.setScale(compiled, FLAT_WINDOW_VARIANCE);
  }

  /**
   * Sets accepted[i] to 1 when listed window i passes every stage, else 0; returns
   * how many passed. A cascade without stages accepts every listed window.
   */
  accept(entries: ArrayLike<number>, inverseDeviations: ArrayLike<number>, count: number, accepted: Uint8Array): number {
    const passed = this.kernel.scanList(entries, inverseDeviations, count, 0, this.stageCount, false);
    const { addresses, tableAddress } = this.kernel.acceptedWindows(passed);
    // The kernel keeps list order, so the passing windows are a subsequence of the list.
    let j = 0;
    for (let i = 0; i < count; i++) {
      const hit = j < passed && addresses[j] === tableAddress + 8 * entries[i]!;
      accepted[i] = hit ? 1 : 0;
      if (hit) j++;
    }
    return passed;
  }

  /**
   * Every window position of an integral image (not sample tables: rows need the
   * squared sums), row by row at a one-pixel shift, the way detection scans a scale:
   * sets accepted[y · columns + x] to 1 for each accepted window, columns = width − W + 1,
   * and returns how many. Flat windows are rejected by the kernel's own σ rule.
   */
  acceptEveryWindow(accepted: Uint8Array): number {
    const { table, kernel } = this;
    const columns = table.width - this.windowWidth + 1;
    const rows = table.height - this.windowHeight + 1;
    let total = 0;
    for (let y = 0; y < rows; y++) {
      const row = y * table.stride;
      const count = kernel.scanRow(row, row + columns - 1, 1);
      if (count === 0) continue;
      const { addresses, tableAddress } = kernel.acceptedWindows(count);
      for (let i = 0; i < count; i++) accepted[y * columns + (addresses[i]! - tableAddress) / 8 - row] = 1;
      total += count;
    }
    return total;
  }

  /** Writes each listed window's margin at stage `stage` (Σ outputs − threshold, negative when it fails) into margins[0 … count − 1]. */
  stageMargins(entries: ArrayLike<number>, inverseDeviations: ArrayLike<number>, count: number, stage: number, margins: Float64Array): void {
    this.kernel.scanList(entries, inverseDeviations, count, stage, stage + 1, true);
    margins.set(this.kernel.acceptedWindows(count).scores.subarray(0, count));
  }

  release(): void {
    this.kernel.release();
  }
}

/** WindowSamples' tables as one table the kernel can read: sample s's window starts at entry s · tableSize (its rotated table, if packed, at rotatedAt after that). */
export function sampleTable(samples: WindowSamples): IntegralImage {
  const stride = samples.windowWidth + 1;
  const table = {
    width: samples.windowWidth,
    height: Math.max(1, (samples.count * samples.tableSize) / stride) - 1,
    stride,
    sum: samples.tables.subarray(0, samples.count * samples.tableSize),
    squaredSum: new Float64Array(0),
  };
  // Each sample's rotated table sits at the same distance from its upright one.
  return samples.rotatedAt === undefined ? table : { ...table, rotatedAt: samples.rotatedAt };
}

/** The samples that are not flat: their indices, table entries and 1/σ. */
function listSamples(samples: WindowSamples): { indices: Int32Array; entries: Int32Array; inverses: Float64Array } {
  let count = 0;
  for (let s = 0; s < samples.count; s++) if (samples.inverseStandardDeviations[s] !== 0) count++;
  const indices = new Int32Array(count);
  const entries = new Int32Array(count);
  const inverses = new Float64Array(count);
  for (let s = 0, i = 0; s < samples.count; s++) {
    const inverse = samples.inverseStandardDeviations[s]!;
    if (inverse === 0) continue;
    indices[i] = s;
    entries[i] = s * samples.tableSize;
    inverses[i++] = inverse;
  }
  return { indices, entries, inverses };
}

function withSamples<T>(cascade: DetectorCascade, samples: WindowSamples, listed: number, use: (evaluator: WindowListEvaluator) => T): T {
  const evaluator = new WindowListEvaluator(cascade, sampleTable(samples), listed);
  try {
    return use(evaluator);
  } finally {
    evaluator.release();
  }
}

/**
 * Which samples the cascade accepts: result[s] is 1 when sample s passes every
 * stage. Flat samples are always rejected, as detection never reports a flat
 * window (a cascade without stages accepts every other sample).
 */
export function acceptSamples(cascade: DetectorCascade, samples: WindowSamples): Uint8Array {
  const result = new Uint8Array(samples.count);
  const { indices, entries, inverses } = listSamples(samples);
  if (indices.length === 0) return result;
  const accepted = new Uint8Array(indices.length);
  withSamples(cascade, samples, indices.length, (evaluator) => evaluator.accept(entries, inverses, indices.length, accepted));
  for (let i = 0; i < indices.length; i++) result[indices[i]!] = accepted[i]!;
  return result;
}

/**
 * How far each sample gets: stagesPassed[s] stages passed before the first it
 * fails (stages.length when accepted), margins[s] the margin of that failing
 * stage, or of the last stage when accepted (0 without stages), and evidence[s]
 * the sum of the margins of the stages it passed, in stage order — for an accepted
 * sample, the score detection gives the same window (RawHits), bit for bit (0 when
 * no stage passed). Flat samples pass no stage and get margin −∞.
 */
export function cascadeDepths(cascade: DetectorCascade, samples: WindowSamples): { stagesPassed: Int32Array; margins: Float64Array; evidence: Float64Array } {
  const stagesPassed = new Int32Array(samples.count);
  const margins = new Float64Array(samples.count);
  const evidence = new Float64Array(samples.count);
  const listed = listSamples(samples);
  for (let s = 0; s < samples.count; s++) if (samples.inverseStandardDeviations[s] === 0) margins[s] = -Infinity;
  let alive = listed.indices.length;
  if (alive === 0 || cascade.stages.length === 0) return { stagesPassed, margins, evidence };
  const { indices, entries, inverses } = listed;
  const stageMargins = new Float64Array(alive);
  withSamples(cascade, samples, alive, (evaluator) => {
    for (let stage = 0; stage < cascade.stages.length && alive > 0; stage++) {
      evaluator.stageMargins(entries, inverses, alive, stage, stageMargins);
      // Survivors are compacted in place, in order, for the next stage.
      let kept = 0;
      for (let i = 0; i < alive; i++) {
        const margin = stageMargins[i]!;
        const s = indices[i]!;
        margins[s] = margin;
        if (margin < 0) continue;
        // The kernel's order: the first margin alone, then each later one added.
        evidence[s] = stage === 0 ? margin : evidence[s]! + margin;
        stagesPassed[s] = stage + 1;
        indices[kept] = s;
        entries[kept] = entries[i]!;
        inverses[kept++] = inverses[i]!;
      }
      alive = kept;
    }
  });
  return { stagesPassed, margins, evidence };
}

/**
 * Σ outputs of one stage on every sample (no threshold), −∞ for flat samples
 * (which pass no stage). The kernel computes score − 0 with the threshold at 0,
 * which is the score itself, bit for bit.
 */
export function stageSampleScores(stage: Pick<DetectorStage, 'weakClassifiers'>, windowWidth: number, windowHeight: number, samples: WindowSamples): Float64Array {
  const scores = new Float64Array(samples.count).fill(-Infinity);
  const { indices, entries, inverses } = listSamples(samples);
  if (indices.length === 0) return scores;
  const cascade: DetectorCascade = { windowWidth, windowHeight, stages: [{ threshold: 0, weakClassifiers: stage.weakClassifiers }] };
  const listedScores = new Float64Array(indices.length);
  withSamples(cascade, samples, indices.length, (evaluator) => evaluator.stageMargins(entries, inverses, indices.length, 0, listedScores));
  for (let i = 0; i < indices.length; i++) scores[indices[i]!] = listedScores[i]!;
  return scores;
}
