import { fileURLToPath } from 'node:url';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

const here = (p: string) => fileURLToPath(new URL(p, import.meta.url));
const apiTarget = `http://127.0.0.1:${process.env.PORT ?? '3000'}`;

export default defineConfig({
  root: here('./client'),
  plugins: [react(), tailwindcss()],
  resolve: {
    alias: {
      '@shared': here('./shared/src'),
      '@': here('./client/src'),
    },
  },
  build: {
    outDir: here('./dist/client'),
    emptyOutDir: true,
    sourcemap: true,
    rolldownOptions: {
      output: {
        // Libraries in chunks of their own: they change less often than our code, so a release
        // leaves them cached in the browser, and no chunk passes the 500 kB warning.
        codeSplitting: {
          groups: [
            { name: 'react', test: /node_modules[\\/](react|react-dom|scheduler|react-router)[\\/]/, priority: 30 },
            { name: 'data', test: /node_modules[\\/](@tanstack|zod|date-fns|socket\.io-client|engine\.io-client|socket\.io-parser)[\\/]/, priority: 20 },
          ],
        },
      },
    },
  },
  server: {
    port: Number(process.env.VITE_PORT ?? 5173),
    proxy: {
      '/api': apiTarget,
      '/socket.io': { target: apiTarget, ws: true },
    },
  },
  test: {
    // On CI a failed test gets one more attempt; npm test lists every test that needed it as flaky.
    retry: process.env.CI ? 1 : 0,
    projects: [
      {
        extends: true,
        test: {
          name: 'unit',
          root: here('.'),
          environment: 'node',
          include: ['tests/unit/**/*.test.ts', 'tests/model/**/*.test.ts'],
        },
      },
      {
        extends: true,
        test: {
          name: 'client',
          root: here('.'),
          environment: 'jsdom',
          include: ['tests/client/**/*.test.tsx'],
          setupFiles: ['tests/client/setup.ts'],
        },
      },
      {
        extends: true,
        test: {
          name: 'integration',
          root: here('.'),
          environment: 'node',
          include: ['tests/integration/**/*.test.ts'],
          globalSetup: ['tests/integration/global-setup.ts'],
          env: { EDGECASE_MODE: 'test' },
          fileParallelism: false,
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          // Fault tests: each file starts its own MariaDB, Redis, web server and workers.
          name: 'reliability',
          root: here('.'),
          environment: 'node',
          include: ['tests/reliability/**/*.test.ts'],
          env: { EDGECASE_MODE: 'test' },
          fileParallelism: false,
          testTimeout: 240_000,
          hookTimeout: 180_000,
        },
      },
    ],
  },
});
