import type { BoosterKind } from '../boost/booster.js';
import type { SplitCandidate } from '../boost/best-split.js';

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
}

export type WorkerRequest =
  | { readonly id: number; readonly type: 'build'; readonly job: MatrixBuildJob; readonly featureStart: number; readonly featureEnd: number }
  | { readonly id: number; readonly type: 'search'; readonly job: SplitSearchJob; readonly featureStart: number; readonly featureEnd: number };

export type WorkerReply =
  | { readonly id: number; readonly type: 'built' }
  | { readonly id: number; readonly type: 'searched'; readonly candidate: SplitCandidate | null }
  | { readonly id: number; readonly type: 'failed'; readonly message: string };
