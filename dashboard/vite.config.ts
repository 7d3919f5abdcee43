import { fileURLToPath } from 'node:url';
import react from '@vitejs/plugin-react';
import { defaultClientConditions, defineConfig } from 'vite';

const root = fileURLToPath(new URL('.', import.meta.url));
const apiTarget = `http://127.0.0.1:${process.env.API_PORT ?? 3000}`;

/**
 * The dashboard's dev server and build. `/api` is proxied to the API (its server-sent event
 * routes stream through: the proxy must not buffer them). The `source` condition makes
 * `@wellkept/core` resolve to its TypeScript sources, so no build of core is needed.
 */
export default defineConfig({
  root,
  plugins: [react()],
  resolve: {
    conditions: ['source', ...defaultClientConditions],
    // One React for the app, Tremor, React Router and TanStack Query.
    dedupe: ['react', 'react-dom'],
  },
  server: {
    proxy: {
      '/api': {
        target: apiTarget,
        changeOrigin: false,
        configure(proxy) {
          // Event streams must reach the browser as they are written.
          proxy.on('proxyRes', (res) => {
            if (String(res.headers['content-type'] ?? '').startsWith('text/event-stream')) {
              res.headers['cache-control'] = 'no-cache, no-transform';
              res.headers['x-accel-buffering'] = 'no';
            }
          });
        },
      },
    },
  },
  preview: {
    proxy: { '/api': { target: apiTarget } },
  },
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    sourcemap: true,
    chunkSizeWarningLimit: 700,
    rolldownOptions: {
      // Tremor's package does not declare itself free of side effects, so one imported table
      // would pull its whole bundle (charts included, ~225 KB gzip). Its modules have none.
      treeshake: {
        moduleSideEffects: (id: string) => !/[\\/]@tremor[\\/]react[\\/]dist[\\/].*\.js$/.test(id),
      },
    },
  },
});
