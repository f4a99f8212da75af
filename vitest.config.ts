import { defineConfig } from 'vitest/config';
import { config as loadEnv } from 'dotenv';

// vitest does not read .env files by itself. scripts/test.sh (and `bash scripts/db.sh start test`)
// write the test database and test server settings to .env.test; variables already set win.
loadEnv({ path: process.env.BRINKMAP_ENV_FILE ?? '.env.test', quiet: true });

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    testTimeout: 30_000,
  },
});
