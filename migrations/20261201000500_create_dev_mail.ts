import type { Knex } from 'knex';

// Mails received by the local fake SMTP server (scripts/fake-smtp.ts) in development and tests.
// A real deployment sends through SMTP_URL and leaves this table empty.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('dev_mail', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.increments('id').primary();
    t.string('message_id', 255).nullable();
    t.string('mail_from', 254).nullable();
    t.text('rcpt_to').notNullable();
    t.string('subject', 255).nullable();
    t.text('text_body', 'mediumtext').nullable();
    t.text('html_body', 'mediumtext').nullable();
    t.datetime('received_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['received_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('dev_mail');
}
