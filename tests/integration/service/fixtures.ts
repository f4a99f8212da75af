/**
 * Shared fixtures of the service tests: small model documents (invented), model creation through
 * the API, and worker processes spawned with their own queue and timing.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { db, type Client } from '../helpers.ts';

/**
 * Two invented shallow lakes, one-way flow, P' = a - b P + P^8/(1+P^8) (Carpenter, Ludwig &
 * Brock 1999); a narrow sweep keeps one trace well under a second.
 */
export function twoLakes(overrides: { a2?: number; to?: number; name?: string } = {}) {
  return {
    format: 'brinkmap/network-1',
    name: overrides.name ?? 'Two invented lakes',
    element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
    nodes: [{ id: 'upper', parameters: { a: 0.08 } }, { id: 'lower', parameters: { a: overrides.a2 ?? 0.05 } }],
    links: [{ from: 'upper', to: 'lower', weight: 1 }],
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to: overrides.to ?? 0.3 },
  };
}

export async function createModel(client: Client, workspaceId: string, doc: unknown = twoLakes(), name = 'Test lakes'): Promise<{ modelId: number; versionNumber: number }> {
  const res = await client.post(`/api/models?workspace=${workspaceId}`, { name, document: doc });
  if (res.status !== 201) throw new Error(`create model: ${res.status} ${res.text}`);
  return { modelId: res.body.model.id, versionNumber: res.body.version.number };
}

export const ws = (path: string, workspaceId: string) => `${path}${path.includes('?') ? '&' : '?'}workspace=${workspaceId}`;

export interface SpawnedWorker {
  child: ChildProcess;
  output: () => string;
  stop: () => Promise<number | null>;
}

/** A worker process on its own queue (so the test server's worker never takes the test's runs). */
export function spawnWorker(queue: string, env: Record<string, string> = {}): SpawnedWorker {
  const child = spawn(process.execPath, ['--import', 'tsx', 'src/worker/main.ts'], {
    cwd: process.cwd(),
    env: { ...process.env, BRINKMAP_WORKER_QUEUE: queue, BRINKMAP_WORKER_POLL_MS: '100', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  child.stdout!.on('data', (d) => { out += d; });
  child.stderr!.on('data', (d) => { out += d; });
  return {
    child,
    output: () => out,
    stop: async () => {
      // SIGTERM before the worker has loaded (its handlers are set once main.ts runs, after the
      // engine's modules) ends it by the signal, exit code null: wait for its start line first.
      await until('the worker to start', async () => out.includes('started as') || child.exitCode !== null || child.signalCode !== null, 60_000, 50).catch(() => undefined);
      return new Promise((resolve) => {
        if (child.exitCode !== null || child.signalCode !== null) return resolve(child.exitCode);
        child.once('exit', (code) => resolve(code));
        child.kill('SIGTERM');
      });
    },
  };
}

/** Polls until `check` returns a truthy value (or throws after timeoutMs). */
export async function until<T>(what: string, check: () => Promise<T | null | undefined | false>, timeoutMs = 30_000, everyMs = 100): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await check();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}

export async function runRow(runId: number) {
  return db('runs').where({ id: runId }).first();
}
