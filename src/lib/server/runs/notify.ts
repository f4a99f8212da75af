/**
 * The "tell me when it finishes" e-mail, sent through the same mail path as invitations (the fake
 * SMTP server on loopback in development and tests, SMTP_URL in a deployment).
 */
import { db } from '../db.ts';
import { sendMail } from '../mail/mailer.ts';
import { serverEnv } from '../env.ts';

export async function notifyRunFinished(runId: number, status: 'done' | 'failed'): Promise<boolean> {
  const row = await db('runs as r')
    .join('users as u', 'u.id', 'r.created_by')
    .join('models as m', 'm.id', 'r.model_id')
    .join('model_versions as v', 'v.id', 'r.model_version_id')
    .where('r.id', runId)
    .first('u.email', 'u.display_name', 'm.name as model_name', 'v.number', 'r.error', 'r.workspace_id', 'r.notify', 'r.kind');
  if (!row || !row.notify) return false;
  const link = `${serverEnv().publicOrigin}/runs/${runId}?workspace=${encodeURIComponent(row.workspace_id)}`;
  const error = typeof row.error === 'string' ? JSON.parse(row.error) : row.error;
  const what = `${row.kind === 'escapes' ? 'escape study ' : row.kind === 'map' ? 'two-parameter map ' : ''}run ${runId} of "${row.model_name}" (version ${row.number})`;
  const text = status === 'done'
    ? `Hello ${row.display_name},\n\nYour ${what} has finished.\n\nOpen it: ${link}\n\nModel results are indicative; check them with domain experts and local regulation before acting on them.\n`
    : `Hello ${row.display_name},\n\nYour ${what} failed: ${error?.message ?? 'no diagnostic recorded'}.\n\nDetails: ${link}\n`;
  await sendMail({ to: row.email, subject: `Brinkmap: ${what} ${status === 'done' ? 'finished' : 'failed'}`, text });
  return true;
}
