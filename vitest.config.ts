import { defineConfig } from 'vitest/config';
import react from '@vitejs/plugin-react';
import { alias } from './vite.config.ts';

// Unit tests (shared/, client/) and API tests (server/, against the real database that
// docker-less-scripts/test.sh starts and names in DATABASE_URL).
export default defineConfig({
  plugins: [react()],
  resolve: { alias },
  test: {
    projects: [
      {
        extends: true,
        test: { name: 'unit', environment: 'node', include: ['shared/**/*.test.ts', 'db/**/*.test.ts'] },
      },
      {
        extends: true,
        // Rendering forms in jsdom takes seconds on a loaded 2-core machine: a generous limit, so
        // that only a test that really hangs fails on time.
        test: { name: 'client', environment: 'jsdom', include: ['client/**/*.test.{ts,tsx}'], testTimeout: 30_000 },
      },
      {
        extends: true,
        test: {
          name: 'api',
          environment: 'node',
          include: ['server/**/*.test.ts'],
          testTimeout: 30_000,
          hookTimeout: 60_000,
          globalSetup: ['server/test/global-setup.ts'],
          setupFiles: ['server/test/setup-origin.ts'],
        },
      },
    ],
  },
});
