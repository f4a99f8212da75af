/**
 * `npm run load`: a bounded load test of the running app on loopback. Signs in as the demo modeler,
 * makes sure a stored 6-node diagram exists (an invented six-lake chain; computed once by the
 * worker, reused afterwards), then fetches that run's diagram with concurrent clients for a fixed
 * time and prints requests per second and p50/p95/p99 latency.
 *
 *   npm run load -- [--url http://127.0.0.1:4321] [--seconds 10] [--clients 16] [--max-requests 50000]
 *                   [--view preview|full] [--email E --password P] [--sub progress]
 *
 * Goal on the 2-core development machine: 200 requests/s with p99 under 250 ms and no errors, for
 * the drawing view (?view=preview: the stored diagram thinned at store time, special points and
 * regime bands complete). The full diagram (1.7 MB of JSON for the six lakes) is timed on a short
 * sequential sample beside it. Refuses any host that is not loopback.
 */
import { readFileSync } from 'node:fs';

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] !== undefined ? process.argv[i + 1] : fallback;
}

const demo = JSON.parse(readFileSync(new URL('../seeds/demo-accounts.json', import.meta.url), 'utf8')) as { users: { role: string; email: string; password: string }[] };
const modeler = demo.users.find((u) => u.role === 'modeler')!;
const base = new URL(arg('url', process.env.LOAD_URL ?? process.env.PUBLIC_ORIGIN ?? 'http://127.0.0.1:4321'));
const seconds = Math.min(120, Math.max(1, Number(arg('seconds', '10'))));
const clients = Math.min(256, Math.max(1, Number(arg('clients', '16'))));
const maxRequests = Math.min(1_000_000, Math.max(1, Number(arg('max-requests', '50000'))));
const view = arg('view', 'preview') === 'full' ? 'full' : 'preview';
const email = arg('email', modeler.email);
/** Diagnostics: fetch another path of the same run instead (e.g. "progress" for a tiny response). */
const sub = arg('sub', '');
const password = arg('password', modeler.password);

if (!['127.0.0.1', 'localhost', '[::1]', '::1'].includes(base.hostname)) {
  console.error(`load: refusing ${base.origin}: this script only runs against loopback`);
  process.exit(2);
}
const origin = base.origin;
let cookie = '';

async function call(method: string, path: string, body?: unknown): Promise<{ status: number; json: any; bytes: number }> {
  const res = await fetch(origin + path, {
    method,
    headers: { cookie, origin, ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const set = res.headers.getSetCookie();
  if (set.length) cookie = set.map((c) => c.split(';')[0]).join('; ');
  const text = await res.text();
  let json: any = null;
  try { json = JSON.parse(text); } catch { /* not JSON */ }
  return { status: res.status, json, bytes: text.length };
}

/** Six invented lakes in a chain; the three lower ones so loaded that each has a single (turbid) state. */
const SIX_LAKES = {
  format: 'brinkmap/network-1',
  name: 'Load test: six invented lakes',
  element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
  nodes: [0.08, 0.06, 0.05, 0.4, 0.42, 0.45].map((a, i) => ({ id: `lake${i + 1}`, parameters: { a } })),
  links: [1, 2, 3, 4, 5].map((i) => ({ from: `lake${i}`, to: `lake${i + 1}`, weight: 1 })),
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 0.5 },
};

async function sixNodeRun(): Promise<number> {
  const found = await call('GET', `/api/models?q=${encodeURIComponent(SIX_LAKES.name)}&archived=include`);
  if (found.status !== 200) throw new Error(`listing models failed: ${found.status} (is the demo modeler a member of a workspace?)`);
  let modelId: number | undefined = found.json.items[0]?.id;
  if (!modelId) {
    const created = await call('POST', '/api/models', { name: SIX_LAKES.name, description: 'Invented model used by npm run load.', tags: ['load-test'], document: SIX_LAKES });
    if (created.status !== 201) throw new Error(`creating the six-lake model failed: ${created.status} ${JSON.stringify(created.json)}`);
    modelId = created.json.model.id as number;
  }
  const started = await call('POST', '/api/runs', { modelId });
  if (started.status !== 201) throw new Error(`starting the run failed: ${started.status} ${JSON.stringify(started.json)}`);
  const runId = started.json.run.id as number;
  const until = Date.now() + 180_000;
  for (;;) {
    const p = await call('GET', `/api/runs/${runId}/progress`);
    if (p.json?.progress?.status === 'done') return runId;
    if (['failed', 'cancelled'].includes(p.json?.progress?.status)) throw new Error(`run ${runId} ended ${p.json.progress.status}`);
    if (Date.now() > until) throw new Error(`run ${runId} did not finish within 180 s (is a worker running?)`);
    await new Promise((r) => setTimeout(r, 500));
  }
}

const pct = (sorted: number[], q: number) => sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))];

async function main(): Promise<void> {
  const signIn = await call('POST', '/api/auth/sign-in', { email, password });
  if (signIn.status !== 200) throw new Error(`sign-in as ${email} failed: ${signIn.status}`);
  const runId = await sixNodeRun();
  const path = sub ? `/api/runs/${runId}/${sub}` : `/api/runs/${runId}/result${view === 'preview' ? '?view=preview' : ''}`;
  const probe = await call('GET', path);
  if (probe.status !== 200) throw new Error(`GET ${path}: ${probe.status}`);
  console.log(`load: ${origin}${path}  (run ${runId}${probe.json?.result ? `: ${probe.json.result.pointCount} stored points, ${probe.json.result.viewPoints} served` : ''}, ${(probe.bytes / 1024).toFixed(0)} KiB per response)`);
  for (let i = 0; i < 20; i++) await call('GET', path);

  const latencies: number[] = [];
  let errors = 0;
  let issued = 0;
  const t0 = performance.now();
  const deadline = t0 + seconds * 1000;
  async function client(): Promise<void> {
    while (performance.now() < deadline && issued < maxRequests) {
      issued++;
      const s = performance.now();
      try {
        const res = await fetch(origin + path, { headers: { cookie } });
        await res.arrayBuffer();
        if (res.status !== 200) errors++;
      } catch {
        errors++;
      }
      latencies.push(performance.now() - s);
    }
  }
  await Promise.all(Array.from({ length: clients }, client));
  const elapsed = (performance.now() - t0) / 1000;
  latencies.sort((a, b) => a - b);
  const rps = latencies.length / elapsed;
  const p99 = pct(latencies, 0.99);
  console.log(`load: ${latencies.length} requests by ${clients} clients in ${elapsed.toFixed(1)} s, ${errors} errors`);
  console.log(`load: ${rps.toFixed(0)} requests/s   p50 ${pct(latencies, 0.5).toFixed(1)} ms   p95 ${pct(latencies, 0.95).toFixed(1)} ms   p99 ${p99.toFixed(1)} ms   max ${latencies[latencies.length - 1].toFixed(1)} ms`);

  if (view === 'preview') {
    const full: number[] = [];
    for (let i = 0; i < 10; i++) {
      const s = performance.now();
      const r = await call('GET', `/api/runs/${runId}/result`);
      if (r.status !== 200) errors++;
      full.push(performance.now() - s);
    }
    full.sort((a, b) => a - b);
    console.log(`load: full diagram, 10 sequential requests: p50 ${pct(full, 0.5).toFixed(1)} ms, max ${full[full.length - 1].toFixed(1)} ms`);
  }
  const met = rps >= 200 && p99 < 250 && errors === 0;
  console.log(`load: goal (>= 200 requests/s, p99 < 250 ms, no errors) ${met ? 'MET' : 'NOT MET'}`);
  process.exitCode = errors === 0 ? 0 : 1;
}

main().catch((e) => {
  console.error(`load: ${(e as Error).message}`);
  process.exit(1);
});
