import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import {
  runBacktest,
  type BacktestInput,
  type BacktestOutput,
  type BacktestProgress,
} from './backtest';

type WorkerMessage =
  { type: 'progress'; done: number; total: number } | { type: 'done'; output: BacktestOutput };

/** The compiled worker; absent when the sources run directly (unit tests), then it runs inline. */
const WORKER_PATH = join(__dirname, 'evaluation-worker.js');

/** Runs a backtest in a worker thread and resolves with its output. */
export function runBacktestInWorker(
  input: BacktestInput,
  onProgress: BacktestProgress,
): Promise<BacktestOutput> {
  if (!existsSync(WORKER_PATH)) {
    return new Promise((resolve) => resolve(runBacktest(input, onProgress)));
  }
  return new Promise((resolve, reject) => {
    const worker = new Worker(WORKER_PATH, { workerData: input });
    // A stopping server need not wait for a backtest; at the next start it is marked failed.
    worker.unref();
    let output: BacktestOutput | null = null;
    worker.on('message', (message: WorkerMessage) => {
      if (message.type === 'progress') onProgress(message.done, message.total);
      else output = message.output;
    });
    worker.once('error', reject);
    worker.once('exit', (code) => {
      if (output) resolve(output);
      else reject(new Error(`The backtest stopped before it finished (exit code ${code}).`));
    });
  });
}
