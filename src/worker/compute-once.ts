/**
 * One trace computation in a child process: reads { documentText, settings } as JSON on stdin and
 * writes the ComputeOutput as JSON on stdout, the encoded diagram as base64 (`diagramBlob`).
 * Used by the demo seed, which runs inside the knex CLI (CommonJS loading) where the ODE
 * integrator package does not load; this process is plain ESM, exactly like the worker threads.
 */
import { computeTrace } from '../lib/server/runs/compute.ts';

const chunks: Buffer[] = [];
for await (const c of process.stdin) chunks.push(c as Buffer);
const input = JSON.parse(Buffer.concat(chunks).toString('utf8')) as { documentText: string; settings: Record<string, unknown> };
const out = computeTrace(input.documentText, input.settings, { onProgress: () => undefined, isCancelled: () => false });
const blob = out.diagramBlob;
process.stdout.write(JSON.stringify({ ...out, diagramBlob: Buffer.from(blob.buffer, blob.byteOffset, blob.byteLength).toString('base64') }));
