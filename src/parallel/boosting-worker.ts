// Worker side of the boosting pool: builds response-matrix rows and searches
// splits over a share of the features, on memory the main thread shares.
// Loaded from dist/ as JavaScript (Node 20 runs no TypeScript in workers).
import { parentPort } from 'node:worker_threads';
import { createSplitScratch, searchBestSplit } from '../boost/best-split.js';
import { fillResponseRows } from '../boost/response-matrix.js';
import type { WorkerReply, WorkerRequest } from './boosting-jobs.js';

const port = parentPort;
if (port === null) throw new Error('boosting-worker.js must run in a worker thread.');

const splitScratch = createSplitScratch();
let rowScratch = new Float64Array(0);

port.on('message', (request: WorkerRequest) => {
  let reply: WorkerReply;
  try {
    if (request.type === 'build') {
      const { job } = request;
      if (rowScratch.length < job.sampleCount) rowScratch = new Float64Array(job.sampleCount);
      fillResponseRows(job, job, request.featureStart, request.featureEnd, job, rowScratch);
      reply = { id: request.id, type: 'built' };
    } else {
      const { job } = request;
      const candidate = searchBestSplit(job.bins, job.sampleCount, job.positiveCount, job.weights, job.booster, request.featureStart, request.featureEnd, splitScratch, job.rule ?? 'stump');
      reply = { id: request.id, type: 'searched', candidate };
    }
  } catch (error) {
    reply = { id: request.id, type: 'failed', message: error instanceof Error ? error.message : String(error) };
  }
  port.postMessage(reply);
});
