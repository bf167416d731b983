import type { BoosterKind } from './booster.js';
import type { SplitCandidate, SplitRule } from './best-split.js';

// What training asks of a worker pool, stated here in the boosting core so that the core
// depends on no folder above it; src/parallel/boosting-pool.ts implements it with worker threads.

/**
 * Messages between the boosting pool and its workers. Every typed array here is
 * a view on a SharedArrayBuffer, so posting one shares memory instead of copying;
 * workers write their own matrix rows and only read everything else.
 */
export interface MatrixBuildJob {
  readonly sampleCount: number;
  readonly positiveCount: number;
  readonly tableSize: number;
  readonly columns: Float32Array;
  readonly inverseStandardDeviations: Float64Array;
  readonly starts: Int32Array;
  readonly offsets: Int32Array;
  readonly coefficients: Float64Array;
  readonly bins: Uint8Array;
  readonly minimums: Float64Array;
  readonly binWidths: Float64Array;
}

/** One split search over a response matrix under the round's weights. */
export interface SplitSearchJob {
  readonly bins: Uint8Array;
  readonly featureCount: number;
  readonly sampleCount: number;
  readonly positiveCount: number;
  readonly weights: Float64Array;
  readonly booster: BoosterKind;
  /** The criterion (searchBestSplit); `stump` when absent. */
  readonly rule?: SplitRule;
}


/**
 * A set of worker threads for training (DESIGN.md §4): they build the response
 * matrix and search each round's best split over shares of the features, on
 * SharedArrayBuffers. Create one, reuse it for every stage, close it at the end.
 * Results do not depend on the worker count (see searchBestSplit for tie-breaking).
 */
export interface BoostingPool {
  /** Number of worker threads, ≥ 1. */
  readonly workers: number;
  /** Fills every row of the shared response matrix described by `job`. */
  buildMatrix(job: MatrixBuildJob, featureCount: number): Promise<void>;
  /** The best split over all features: lowest error, ties to the lowest feature index. */
  searchSplit(job: SplitSearchJob): Promise<SplitCandidate | null>;
  /** Stops every worker; afterwards the pool keeps nothing alive and refuses work. */
  close(): Promise<void>;
}

