/**
 * Knex CLI configuration. Run through `npm run knex -- <command>` (which loads this file with tsx,
 * because the knex CLI cannot load a TypeScript knexfile under "type": "module" on Node 20).
 * The connection comes from the environment; see src/lib/server/db-config.ts.
 */
import 'dotenv/config';
import type { Knex } from 'knex';
import { knexConfig } from './src/lib/server/db-config.ts';

const config: Knex.Config = knexConfig();

export default config;
