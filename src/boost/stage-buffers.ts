import { checkThat } from '../check.js';
import { compileFeatures, type CompiledFeatures } from '../features/compiled-features.js';
import { featuresNeedRotatedTable, type HaarFeature } from '../features/haar-feature.js';

/** Default cap on the response table: 4 GiB, also the largest single buffer Node 20 allows. */
export const DEFAULT_MATRIX_MEMORY_BYTES = 2 ** 32;

/** How large the biggest stage of a run can be; every buffer is sized from these once. */
export interface StageBufferLimits {
  /** Candidate features of the run (all of them, before any memory-cap sampling). */
  readonly featureCount: number;
  /** Corner reads of all candidate features together (CompiledFeatures.offsets.length). */
  readonly cornerCount: number;
  /** Most samples (positives + negatives) any stage of the run trains on. */
  readonly sampleCount: number;
  /** Entries of one sample's integral table: (windowWidth + 1) · (windowHeight + 1). */
  readonly tableSize: number;
  /** Cap on the response table in bytes; the table never holds more bins than this. */
  readonly memoryBytes: number;
  /** Back the buffers with SharedArrayBuffers, so a worker pool can read and fill them. */
  readonly shared: boolean;
}

/**
 * The memory every stage of a training run works in, allocated once for the run and
 * reused by each stage: the response table (one byte per feature and sample), its
 * per-feature bin edges, the sample columns, the compiled features and the boosting
 * weights. A stage takes views of the prefixes it needs.
 *
 * Why one set for the run: a worker thread that is handed a SharedArrayBuffer keeps its
 * memory alive until that thread collects garbage, and boosting workers allocate so
 * little that they rarely do; fresh buffers per stage therefore piled up, one response
 * table per stage. Reusing one set keeps peak memory at the largest stage's needs,
 * whatever the number of stages.
 *
 * Memory: min(memoryBytes, featureCount · sampleCount) bytes for the table, plus
 * 16 · featureCount + 12 · cornerCount + 4 · (featureCount + 1) + (4 · tableSize + 24) · sampleCount.
 */
export interface StageBuffers {
  readonly limits: StageBufferLimits;
  /** Response-table capacity in bytes (bins). */
  readonly tableBytes: number;
  readonly bins: Uint8Array;
  readonly minimums: Float64Array;
  readonly binWidths: Float64Array;
  readonly columns: Float32Array;
  readonly inverseStandardDeviations: Float64Array;
  readonly weights: Float64Array;
  /** A tree node's weights (the round's weights, zero outside the node; see growTree). */
  readonly nodeWeights: Float64Array;
  readonly starts: Int32Array;
  readonly offsets: Int32Array;
  readonly coefficients: Float64Array;
}

/**
 * Allocates the buffers for a run whose stages stay within `limits`.
 * @throws RectboostError `invalid-option` when a limit is not a positive integer.
 * @example const buffers = createStageBuffers({ featureCount: 162336, cornerCount, sampleCount: 3000, tableSize: 625, memoryBytes: 2 ** 32, shared: true });
 */
export function createStageBuffers(limits: StageBufferLimits): StageBuffers {
  const { featureCount, cornerCount, sampleCount, tableSize, shared } = limits;
  for (const [name, value] of [['feature count', featureCount], ['corner count', cornerCount], ['sample count', sampleCount], ['table size', tableSize]] as const) {
    checkThat(Number.isInteger(value) && value >= 1, `Stage buffers need a positive integer ${name}; received ${value}.`);
  }
  const tableBytes = Math.max(sampleCount, Math.min(Math.floor(limits.memoryBytes), featureCount * sampleCount));
  const allocate = (bytes: number): ArrayBufferLike => (shared ? new SharedArrayBuffer(bytes) : new ArrayBuffer(bytes));
  return {
    limits,
    tableBytes,
    bins: new Uint8Array(allocate(tableBytes)),
    minimums: new Float64Array(allocate(8 * featureCount)),
    binWidths: new Float64Array(allocate(8 * featureCount)),
    columns: new Float32Array(allocate(4 * tableSize * sampleCount)),
    inverseStandardDeviations: new Float64Array(allocate(8 * sampleCount)),
    weights: new Float64Array(allocate(8 * sampleCount)),
    nodeWeights: new Float64Array(allocate(8 * sampleCount)),
    starts: new Int32Array(allocate(4 * (featureCount + 1))),
    offsets: new Int32Array(allocate(4 * cornerCount)),
    coefficients: new Float64Array(allocate(8 * cornerCount)),
  };
}

/**
 * Copies compiled features into the buffers' corner arrays and returns views of the
 * filled prefixes (the form the response-table build reads).
 * @throws RectboostError `invalid-option` when they do not fit the limits.
 */
export function placeCompiledFeatures(buffers: StageBuffers, compiled: CompiledFeatures): Pick<CompiledFeatures, 'starts' | 'offsets' | 'coefficients'> {
  checkThat(compiled.count <= buffers.limits.featureCount && compiled.offsets.length <= buffers.limits.cornerCount,
    `${compiled.count} features with ${compiled.offsets.length} corners do not fit stage buffers made for ${buffers.limits.featureCount} and ${buffers.limits.cornerCount}.`);
  const starts = buffers.starts.subarray(0, compiled.count + 1);
  const offsets = buffers.offsets.subarray(0, compiled.offsets.length);
  const coefficients = buffers.coefficients.subarray(0, compiled.coefficients.length);
  starts.set(compiled.starts);
  offsets.set(compiled.offsets);
  coefficients.set(compiled.coefficients);
  return { starts, offsets, coefficients };
}

/**
 * Buffers for a training run over `features` whose stages train on at most
 * `sampleCount` samples, the table capped at memoryBytes (at most
 * DEFAULT_MATRIX_MEMORY_BYTES). This is the whole run's table: stages reuse it.
 * @example stageBuffersForRun(enumerateFeatures(24, 24), 24, 24, 3000, 2 ** 31, true)
 */
export function stageBuffersForRun(features: readonly HaarFeature[], windowWidth: number, windowHeight: number, sampleCount: number, memoryBytes: number, shared: boolean): StageBuffers {
  // Tilted features read each sample's rotated table, packed after its upright one.
  const uprightSize = (windowWidth + 1) * (windowHeight + 1);
  const rotatedAt = featuresNeedRotatedTable(features) ? uprightSize : undefined;
  return createStageBuffers({
    featureCount: features.length,
    cornerCount: compileFeatures(features, windowWidth + 1, rotatedAt).offsets.length,
    sampleCount,
    tableSize: rotatedAt === undefined ? uprightSize : 2 * uprightSize,
    memoryBytes: Math.min(memoryBytes, DEFAULT_MATRIX_MEMORY_BYTES),
    shared,
  });
}
