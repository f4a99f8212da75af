/**
 * `npm run worker`: one worker process. Configured by the environment (database as for the app;
 * BRINKMAP_WORKER_QUEUE, _THREADS, _LEASE_MS, _HEARTBEAT_MS, _POLL_MS; see docs/deploy.md).
 * SIGTERM / SIGINT: stop claiming, hand unfinished runs back to the queue, close the pool, exit 0.
 */
import 'dotenv/config';
import { closeDb } from '../lib/server/db.ts';
import { RunWorker, workerOptionsFromEnv } from './run-worker.ts';

const worker = new RunWorker(workerOptionsFromEnv());
worker.start();

let stopping = false;
async function shutdown(signal: string): Promise<void> {
  if (stopping) return;
  stopping = true;
  console.log(`[worker ${process.pid}] ${signal}: stopping`);
  const force = setTimeout(() => {
    console.error(`[worker ${process.pid}] did not stop within 10 s; exiting anyway`);
    process.exit(1);
  }, 10_000);
  force.unref();
  try {
    await worker.stop();
    await closeDb();
  } finally {
    clearTimeout(force);
  }
  process.exit(0);
}

process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
