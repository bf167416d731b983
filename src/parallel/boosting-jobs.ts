import type { SplitCandidate } from '../boost/best-split.js';
import type { MatrixBuildJob, SplitSearchJob } from '../boost/boosting-pool-contract.js';

export type { MatrixBuildJob, SplitSearchJob };

/** Messages between the boosting pool and its workers (jobs: see boost/boosting-pool-contract.ts). */
export type WorkerRequest =
  | { readonly id: number; readonly type: 'build'; readonly job: MatrixBuildJob; readonly featureStart: number; readonly featureEnd: number }
  | { readonly id: number; readonly type: 'search'; readonly job: SplitSearchJob; readonly featureStart: number; readonly featureEnd: number };

export type WorkerReply =
  | { readonly id: number; readonly type: 'built' }
  | { readonly id: number; readonly type: 'searched'; readonly candidate: SplitCandidate | null }
  | { readonly id: number; readonly type: 'failed'; readonly message: string };
