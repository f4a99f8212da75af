/**
 * Demo seed, INVENTED DATA: a fictional watershed team ("Fennmoor Lakes Working Group") that studies
 * an imaginary chain of shallow lakes. The people, the lakes and the group do not exist.
 *
 * One workspace and three demo users, one per role; the accounts (and the passwords `npm start`
 * prints) live in seeds/demo-accounts.json. Re-runnable: rows are upserted by id, the demo passwords
 * are reset to the listed ones.
 *
 * Later seeds add to this workspace: knex runs seed files in name order, so e.g.
 * seeds/02_demo_models.ts can `import { DEMO } from './01_demo_workspace.ts'` and insert models
 * for DEMO.workspace.id created by DEMO.users[1].id (the modeler).
 */
import type { Knex } from 'knex';
import { readFileSync } from 'node:fs';
import { hashPassword } from '../src/lib/server/auth/password.ts';

interface DemoFile {
  workspace: { id: string; name: string };
  users: { id: string; email: string; displayName: string; role: 'owner' | 'modeler' | 'reviewer'; password: string }[];
}

export const DEMO: DemoFile = JSON.parse(readFileSync(new URL('./demo-accounts.json', import.meta.url), 'utf8'));

export async function seed(knex: Knex): Promise<void> {
  const hashes = await Promise.all(DEMO.users.map((u) => hashPassword(u.password)));
  await knex.transaction(async (trx) => {
    for (const [i, u] of DEMO.users.entries()) {
      await trx('users')
        .insert({ id: u.id, email: u.email, display_name: u.displayName, password_hash: hashes[i] })
        .onConflict('id')
        .merge(['email', 'display_name', 'password_hash']);
    }
    const owner = DEMO.users.find((u) => u.role === 'owner')!;
    await trx('workspaces')
      .insert({ id: DEMO.workspace.id, name: DEMO.workspace.name, created_by: owner.id })
      .onConflict('id')
      .merge(['name']);
    for (const u of DEMO.users) {
      await trx('memberships')
        .insert({ workspace_id: DEMO.workspace.id, user_id: u.id, role: u.role })
        .onConflict(['workspace_id', 'user_id'])
        .merge(['role']);
    }
    const seeded = await trx('audit_log').where({ workspace_id: DEMO.workspace.id, action: 'workspace.seeded' }).first('id');
    if (!seeded) {
      await trx('audit_log').insert({
        workspace_id: DEMO.workspace.id,
        actor_id: owner.id,
        action: 'workspace.seeded',
        target_type: 'workspace',
        target_id: DEMO.workspace.id,
        details: JSON.stringify({ note: 'invented demo data' }),
      });
    }
  });
}
