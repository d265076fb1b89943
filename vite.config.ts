import { fileURLToPath, URL } from 'node:url';
import { configDefaults, defineConfig } from 'vitest/config';
import vue from '@vitejs/plugin-vue';

const apiPort = Number(process.env.PORT ?? 3000);
/** The local PostgreSQL server the `pg` project creates its test databases on (`.ci/run` starts it). */
const POSTGRES_TEST_URL = 'postgres://postgres@127.0.0.1:5432/test';
/** Worker suites that never open a database: run once, in `node`, since the `pg` leg would only repeat them. */
const DATABASE_FREE_WORKER_TESTS = [
  'critic-demo-footage',
  'critic-threads',
  'cut-evaluation',
  'frame-pool-abort',
  'motion-field-summary',
  'motion-runs',
  'motion-scale',
  'pairset-files',
].map((name) => `tests/worker/${name}.test.ts`);

export default defineConfig({
  plugins: [vue()],
  resolve: { alias: { '@': fileURLToPath(new URL('./src', import.meta.url)) } },
  server: { port: 5173, proxy: { '/api': `http://localhost:${apiPort}` } },
  build: { outDir: 'dist', chunkSizeWarningLimit: 900 },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: 'node',
          environment: 'node',
          include: ['tests/{unit,api,worker,cli}/**/*.test.ts'],
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
      {
        // The same API and worker suites on PostgreSQL: each test file gets a database of its own on the local
        // server (tests/helpers/test-database.ts). Tests that measure SQLite itself stay in `node` only.
        extends: true,
        test: {
          name: 'pg',
          environment: 'node',
          include: ['tests/{api,worker}/**/*.test.ts', 'tests/unit/migrations.test.ts'],
          exclude: [...configDefaults.exclude, ...DATABASE_FREE_WORKER_TESTS],
          env: { KINEFOLD_TEST_POSTGRES_URL: process.env.KINEFOLD_TEST_POSTGRES_URL ?? POSTGRES_TEST_URL },
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
      {
        extends: true,
        test: { name: 'client', environment: 'happy-dom', include: ['tests/client/**/*.test.ts'] },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          environment: 'node',
          include: ['tests/e2e/**/*.test.ts'],
          testTimeout: 120_000,
          hookTimeout: 180_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
