import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { betterSplit, type SplitCandidate } from '../boost/best-split.js';
import { checkInteger } from '../check.js';
import { RectboostError } from '../errors.js';
import type { BoostingPool } from '../boost/boosting-pool-contract.js';
import type { WorkerReply, WorkerRequest } from './boosting-jobs.js';

export type { BoostingPool };

/** Default worker count: the cores Node reports (os.availableParallelism). */
export function defaultWorkerCount(): number {
  return availableParallelism();
}

/**
 * The compiled worker script. Under vitest this module runs from src/*.ts, where
 * no .js sibling exists, so it maps to the build in dist/ (npm test builds first).
 */
function workerScriptUrl(): URL {
  const sibling = new URL('./boosting-worker.js', import.meta.url);
  if (existsSync(fileURLToPath(sibling))) return sibling;
  const built = new URL(sibling.href.replace('/src/parallel/', '/dist/parallel/'));
  if (!existsSync(fileURLToPath(built))) {
    throw new RectboostError('bad-data', `The worker script ${fileURLToPath(built)} is missing; run \`npm run build\` first.`);
  }
  return built;
}

/** Matrix builds are handed out in this many chunks per worker, so cheap and dear feature kinds even out. */
const BUILD_CHUNKS_PER_WORKER = 8;

/**
 * Starts `workers` worker threads and waits until all are online.
 * @throws RectboostError `invalid-option` unless workers is an integer from 1 to 256.
 * @example const pool = await createBoostingPool(defaultWorkerCount()); try { … } finally { await pool.close(); }
 */
export async function createBoostingPool(workers: number): Promise<BoostingPool> {
  checkInteger('workers', workers, 1, 256);
  const script = workerScriptUrl();
  const threads: Worker[] = [];
  const pending = new Map<number, { resolve: (reply: WorkerReply) => void; reject: (error: Error) => void }>();
  let nextId = 0;
  let closed = false;
  let failure: Error | null = null;

  const failAll = (error: Error): void => {
    failure ??= error;
    for (const { reject } of pending.values()) reject(error);
    pending.clear();
  };

  for (let w = 0; w < workers; w++) {
    const thread = new Worker(script);
    thread.on('message', (reply: WorkerReply) => {
      const waiter = pending.get(reply.id);
      if (waiter === undefined) return;
      pending.delete(reply.id);
      if (reply.type === 'failed') waiter.reject(new RectboostError('bad-data', `A boosting worker failed: ${reply.message}`));
      else waiter.resolve(reply);
    });
    thread.on('error', (error) => failAll(new RectboostError('bad-data', `A boosting worker crashed: ${error.message}`, { cause: error })));
    thread.on('exit', (code) => {
      if (!closed) failAll(new RectboostError('bad-data', `A boosting worker exited unexpectedly with code ${code}.`));
    });
    threads.push(thread);
  }
  await Promise.all(threads.map((thread) => new Promise<void>((resolve, reject) => {
    thread.once('online', () => resolve());
    thread.once('error', reject);
  })));

  const send = (worker: number, request: WorkerRequest): Promise<WorkerReply> => {
    if (closed) return Promise.reject(new RectboostError('invalid-option', 'This boosting pool is closed; create a new one with createBoostingPool.'));
    if (failure !== null) return Promise.reject(failure);
    return new Promise<WorkerReply>((resolve, reject) => {
      pending.set(request.id, { resolve, reject });
      threads[worker]!.postMessage(request);
    });
  };

  return {
    workers,
    async buildMatrix(job, featureCount) {
      const chunk = Math.max(1, Math.ceil(featureCount / (workers * BUILD_CHUNKS_PER_WORKER)));
      let next = 0;
      // Each worker pulls the next chunk when it finishes one; rows are independent,
      // so the order of chunks cannot change the matrix.
      await Promise.all(threads.map(async (_, worker) => {
        while (next < featureCount) {
          const featureStart = next;
          const featureEnd = Math.min(featureCount, next + chunk);
          next = featureEnd;
          await send(worker, { id: nextId++, type: 'build', job, featureStart, featureEnd });
        }
      }));
    },
    async searchSplit(job) {
      const share = Math.ceil(job.featureCount / workers);
      const replies = await Promise.all(threads.map((_, worker) => {
        const featureStart = Math.min(job.featureCount, worker * share);
        const featureEnd = Math.min(job.featureCount, featureStart + share);
        return send(worker, { id: nextId++, type: 'search', job, featureStart, featureEnd });
      }));
      // Workers hold ascending feature ranges; folding in that order with
      // betterSplit keeps the lowest feature index on equal errors.
      let best: SplitCandidate | null = null;
      for (const reply of replies) if (reply.type === 'searched') best = betterSplit(best, reply.candidate);
      return best;
    },
    async close() {
      if (closed) return;
      closed = true;
      failAll(new RectboostError('invalid-option', 'The boosting pool was closed while work was pending.'));
      await Promise.all(threads.map((thread) => thread.terminate()));
    },
  };
}
