import swc from 'unplugin-swc';
import { defineProject } from 'vitest/config';

/**
 * Shared Vitest settings for the Node workspaces. SWC compiles the TypeScript so that Nest's
 * constructor injection gets its decorator metadata (esbuild does not emit it), and the
 * `source` export condition makes workspace packages resolve to their `src/` without a build.
 */
export function nodeProject(name: string, options: { timeoutMs?: number } = {}) {
  return defineProject({
    plugins: [
      swc.vite({
        jsc: {
          parser: { syntax: 'typescript', decorators: true },
          transform: { legacyDecorator: true, decoratorMetadata: true },
          target: 'es2022',
        },
      }),
    ],
    resolve: { conditions: ['source'] },
    ssr: { resolve: { conditions: ['source'] } },
    test: {
      name,
      environment: 'node',
      include: ['test/**/*.test.ts', 'src/**/*.spec.ts', 'test/**/*.e2e-spec.ts'],
      testTimeout: options.timeoutMs ?? 30_000,
      hookTimeout: 60_000,
    },
  });
}
