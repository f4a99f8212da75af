import type { Knex } from 'knex';

// Users and lucia 3 sessions. Ids are lucia's random base32 strings (see src/lib/server/ids.ts).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.string('id', 32).primary();
    t.string('email', 254).notNullable().unique();
    t.string('display_name', 100).notNullable();
    t.string('password_hash', 255).notNullable();
    t.datetime('password_changed_at', { precision: 3 }).nullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
  });
  await knex.schema.createTable('sessions', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.string('id', 255).primary();
    t.string('user_id', 32).notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.datetime('expires_at', { precision: 3 }).notNullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['user_id']);
    t.index(['expires_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('sessions');
  await knex.schema.dropTable('users');
}
