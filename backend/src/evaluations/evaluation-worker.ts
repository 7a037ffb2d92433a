import { parentPort, workerData } from 'node:worker_threads';
import { runBacktest, type BacktestInput } from './backtest';

/**
 * Runs one backtest off the server's main thread, so sign-ins and advising
 * requests keep their answer times while the engine computes.
 */
if (parentPort) {
  const port = parentPort;
  const output = runBacktest(workerData as BacktestInput, (done, total) =>
    port.postMessage({ type: 'progress', done, total }),
  );
  port.postMessage({ type: 'done', output });
}
