import type { Knex } from 'knex';

// An owner invites an address with a role. Only a SHA-256 of the link token is stored, so a read of
// this table does not hand out working invitation links.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('invitations', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.string('id', 32).primary();
    t.string('workspace_id', 32).notNullable().references('id').inTable('workspaces').onDelete('CASCADE');
    t.string('email', 254).notNullable();
    t.enu('role', ['owner', 'modeler', 'reviewer']).notNullable();
    t.specificType('token_hash', 'CHAR(64)').notNullable().unique();
    t.string('invited_by', 32).nullable().references('id').inTable('users').onDelete('SET NULL');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.datetime('expires_at', { precision: 3 }).notNullable();
    t.datetime('accepted_at', { precision: 3 }).nullable();
    t.string('accepted_by', 32).nullable().references('id').inTable('users').onDelete('SET NULL');
    t.datetime('revoked_at', { precision: 3 }).nullable();
    t.index(['workspace_id', 'email']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('invitations');
}
