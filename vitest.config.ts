import { defineConfig } from 'vitest/config';
import { config as loadEnv } from 'dotenv';

// vitest does not read .env by itself; scripts/test.sh writes the test database settings there.
loadEnv({ path: process.env.BRINKMAP_ENV_FILE ?? '.env' });

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    testTimeout: 30_000,
  },
});
