/**
 * Fake SMTP server for development and tests: accepts every mail on loopback (no TLS, no auth),
 * parses it and stores it in the dev_mail table, where /dev/mail and the tests read it.
 * Started by scripts/start.sh and scripts/test.sh; port from FAKE_SMTP_PORT (default 2525).
 */
import 'dotenv/config';
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';
import { db, closeDb } from '../src/lib/server/db.ts';

const port = Number(process.env.FAKE_SMTP_PORT || 2525);
const MAX_BYTES = 5 * 1024 * 1024;

const server = new SMTPServer({
  secure: false,
  disabledCommands: ['STARTTLS', 'AUTH'],
  authOptional: true,
  size: MAX_BYTES,
  banner: 'Brinkmap fake SMTP (stores mails in dev_mail)',
  onData(stream, session, callback) {
    simpleParser(stream)
      .then(async (mail) => {
        const rcpt = session.envelope.rcptTo.map((r) => r.address).join(', ');
        await db('dev_mail').insert({
          message_id: mail.messageId?.slice(0, 255) ?? null,
          mail_from: (session.envelope.mailFrom ? session.envelope.mailFrom.address : null)?.slice(0, 254) ?? null,
          rcpt_to: rcpt,
          subject: mail.subject?.slice(0, 255) ?? null,
          text_body: mail.text ?? null,
          html_body: typeof mail.html === 'string' ? mail.html : null,
        });
        callback();
      })
      .catch((err) => {
        console.error('[fake-smtp] could not store mail', err);
        callback(err as Error);
      });
  },
});

server.on('error', (err) => console.error('[fake-smtp]', err));
server.listen(port, '127.0.0.1', () => console.log(`[fake-smtp] listening on 127.0.0.1:${port}`));

async function stop() {
  server.close(async () => {
    await closeDb();
    process.exit(0);
  });
  setTimeout(() => process.exit(0), 2000).unref();
}
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
