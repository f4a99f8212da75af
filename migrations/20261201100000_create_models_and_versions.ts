import type { Knex } from 'knex';

// Models belong to a workspace; their documents live in immutable versions. A version's document
// is stored as the exact text that was submitted (so an export is byte-identical to what was saved)
// together with its content hash; editing a model only ever inserts a new version row.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('models', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.increments('id').primary();
    t.string('workspace_id', 32).notNullable().references('id').inTable('workspaces').onDelete('CASCADE');
    t.string('name', 200).notNullable();
    t.text('description').notNullable();
    t.json('tags').notNullable();
    t.string('created_by', 32).nullable().references('id').inTable('users').onDelete('SET NULL');
    t.integer('latest_version', 10).unsigned().notNullable().defaultTo(0);
    t.datetime('archived_at', { precision: 3 }).nullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['workspace_id', 'archived_at', 'updated_at']);
    t.index(['workspace_id', 'name']);
  });
  await knex.schema.createTable('model_versions', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.increments('id').primary();
    t.integer('model_id').unsigned().notNullable().references('id').inTable('models').onDelete('CASCADE');
    t.integer('number').unsigned().notNullable();
    t.string('format', 32).notNullable();
    // LONGTEXT rather than JSON: MariaDB's JSON is LONGTEXT anyway, and we must keep the bytes as sent.
    t.text('document', 'longtext').notNullable();
    t.specificType('hash', 'CHAR(64)').notNullable();
    t.integer('parent_version_id').unsigned().nullable().references('id').inTable('model_versions').onDelete('SET NULL');
    t.string('change_note', 1000).notNullable();
    t.string('created_by', 32).nullable().references('id').inTable('users').onDelete('SET NULL');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.unique(['model_id', 'number']);
    t.index(['model_id', 'hash']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('model_versions');
  await knex.schema.dropTable('models');
}
