import { handler } from '../../../../lib/server/http.ts';
import { requireRole } from '../../../../lib/server/auth/guards.ts';
import { getRunProgress } from '../../../../lib/server/runs/repository.ts';
import { idParam } from '../../../../lib/server/models/route-params.ts';
import { notFound } from '../../../../lib/server/models/service-error.ts';
import { TERMINAL_STATUSES } from '../../../../lib/server/runs/schemas.ts';

const POLL_MS = 500;
/** A stream ends after this long even if the run has not; EventSource reconnects by itself. */
const MAX_STREAM_MS = 10 * 60 * 1000;

/**
 * Server-sent events: `progress` events ({ status, progress, phrase, ... }) whenever the run's row
 * changes (checked twice a second), a comment line every 15 s to keep proxies from closing the
 * connection, and a final `end` event when the run is done, failed or cancelled.
 */
export const GET = handler(async ({ locals, params, request }) => {
  const { workspace } = requireRole(locals);
  const runId = idParam(params.id, 'run');
  const first = await getRunProgress(workspace.id, runId);
  if (!first) throw notFound('run');
  const encoder = new TextEncoder();
  let timer: ReturnType<typeof setTimeout> | undefined;
  let closed = false;
  const stream = new ReadableStream<Uint8Array>({
    start(controller) {
      const started = Date.now();
      let lastSent = '';
      let lastWrite = Date.now();
      const send = (text: string) => {
        if (closed) return;
        try {
          controller.enqueue(encoder.encode(text));
          lastWrite = Date.now();
        } catch {
          closed = true;
        }
      };
      const finish = () => {
        if (closed) return;
        closed = true;
        if (timer) clearTimeout(timer);
        try { controller.close(); } catch { /* already closed by the client */ }
      };
      const tick = async (p: Awaited<ReturnType<typeof getRunProgress>>) => {
        if (closed) return;
        if (!p) { send(`event: end\ndata: {"status":"gone"}\n\n`); return finish(); }
        const data = JSON.stringify(p);
        if (data !== lastSent) {
          send(`event: progress\ndata: ${data}\n\n`);
          lastSent = data;
        } else if (Date.now() - lastWrite > 15_000) {
          send(': still here\n\n');
        }
        if (TERMINAL_STATUSES.includes(p.status)) {
          send(`event: end\ndata: ${data}\n\n`);
          return finish();
        }
        if (Date.now() - started > MAX_STREAM_MS) return finish();
        timer = setTimeout(() => {
          getRunProgress(workspace.id, runId).then(tick, () => finish());
        }, POLL_MS);
      };
      send('retry: 2000\n\n');
      void tick(first);
      request.signal.addEventListener('abort', finish);
    },
    cancel() {
      closed = true;
      if (timer) clearTimeout(timer);
    },
  });
  return new Response(stream, {
    status: 200,
    headers: {
      'Content-Type': 'text/event-stream; charset=utf-8',
      'Cache-Control': 'no-store',
      Connection: 'keep-alive',
      'X-Accel-Buffering': 'no',
    },
  });
});
