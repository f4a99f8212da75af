import { handler, json, notFound } from '../../../lib/server/http.ts';
import { requireRole } from '../../../lib/server/auth/guards.ts';
import { serverEnv } from '../../../lib/server/env.ts';
import { listDevMail } from '../../../lib/server/mail/dev-mail.ts';

/** Mails caught by the local fake SMTP server; owners only, and only when DEV_MAIL_PAGE is on. */
export const GET = handler(async ({ locals }) => {
  requireRole(locals, 'owner');
  if (!serverEnv().devMailPage) throw notFound('The development mail box is off (DEV_MAIL_PAGE).');
  return json({ mails: await listDevMail() });
});
