import { parentPort, workerData } from 'node:worker_threads';
import { BatchJob, chunkBuffers, scoreChunk } from './batch';
import { Model } from './model';
import { Scorer } from './score';

// A batch worker: receives the model once (its typed arrays are shared, not copied), then
// scores chunks of students on request and transfers the packed results back.
interface Init {
  model: Model;
  students: string[];
  job: BatchJob;
}

const init = workerData as Init;
const model = init.model;
const scorer = new Scorer(model);
const port = parentPort;
if (!port) throw new Error('the scoring worker must run as a worker thread');
port.on('message', (msg: { first: number; count: number }) => {
  try {
    const chunk = scoreChunk(model, scorer, init.students, msg.first, msg.count, init.job);
    port.postMessage({ chunk }, chunkBuffers(chunk));
  } catch (e) {
    port.postMessage({ error: e instanceof Error ? e.message : String(e) });
  }
});
