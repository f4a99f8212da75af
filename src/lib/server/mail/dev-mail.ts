import { db } from '../db.ts';

export interface DevMail {
  id: number;
  from: string | null;
  to: string;
  subject: string | null;
  text: string | null;
  links: string[];
  receivedAt: string;
}

/** Mails caught by the local fake SMTP server, newest first. */
export async function listDevMail(limit = 100): Promise<DevMail[]> {
  const rows = await db('dev_mail').orderBy('id', 'desc').limit(limit);
  return rows.map((r) => ({
    id: r.id,
    from: r.mail_from,
    to: r.rcpt_to,
    subject: r.subject,
    text: r.text_body,
    links: Array.from(new Set(String(r.text_body ?? '').match(/https?:\/\/[^\s<>"]+/g) ?? [])),
    receivedAt: new Date(r.received_at).toISOString(),
  }));
}
