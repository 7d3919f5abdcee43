import { fileURLToPath } from 'node:url';
import react from '@vitejs/plugin-react';
import swc from 'unplugin-swc';
import { defaultClientConditions } from 'vite';
import { defineProject } from 'vitest/config';

const here = fileURLToPath(new URL('.', import.meta.url));

/**
 * Component tests run in jsdom (src/**\/*.test.tsx). Browser tests (test/browser/*.test.ts)
 * declare `@vitest-environment node`: they start the real API in-process, so the API's
 * sources get SWC (Nest needs decorator metadata); the dashboard's own files keep Vite's
 * React transform.
 */
export default defineProject({
  plugins: [
    react(),
    swc.vite({
      include: ['**/{api,db,core,ingest,simulator}/src/**/*.ts'],
      exclude: ['**/node_modules/**', '**/dashboard/**'],
      jsc: {
        parser: { syntax: 'typescript', decorators: true },
        transform: { legacyDecorator: true, decoratorMetadata: true },
        target: 'es2022',
      },
    }),
  ],
  resolve: {
    conditions: ['source', ...defaultClientConditions],
    dedupe: ['react', 'react-dom'],
  },
  ssr: { resolve: { conditions: ['source'] } },
  test: {
    name: 'dashboard',
    root: here,
    environment: 'jsdom',
    include: ['src/**/*.test.tsx', 'src/**/*.test.ts', 'test/**/*.test.ts', 'test/**/*.test.tsx'],
    setupFiles: ['./test/setup-dom.ts'],
    testTimeout: 30_000,
    hookTimeout: 120_000,
    css: false,
  },
});
