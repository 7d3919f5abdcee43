import swc from 'unplugin-swc';
import { defineProject } from 'vitest/config';

/**
 * Shared Vitest settings for the Node workspaces. SWC compiles the TypeScript so that Nest's
 * constructor injection gets its decorator metadata (esbuild does not emit it), and the
 * `source` export condition makes workspace packages resolve to their `src/` without a build.
 */
export interface NodeProjectOptions {
  timeoutMs?: number;
  /** Files this project runs (default: every test of the workspace). */
  include?: string[];
  exclude?: string[];
  /**
   * Projects run in groups, lowest first (Vitest `sequence.groupOrder`). Whole-system tests that
   * kill and restart processes and wait for them run in a later group, one file at a time, so
   * the rest of the suite is not competing for the two cores while they wait on the clock.
   */
  groupOrder?: number;
}

export function nodeProject(name: string, options: NodeProjectOptions = {}) {
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
      include: options.include ?? [
        'test/**/*.test.ts',
        'src/**/*.spec.ts',
        'test/**/*.e2e-spec.ts',
      ],
      ...(options.exclude ? { exclude: ['**/node_modules/**', ...options.exclude] } : {}),
      ...(options.groupOrder !== undefined
        ? { sequence: { groupOrder: options.groupOrder }, fileParallelism: false }
        : {}),
      testTimeout: options.timeoutMs ?? 30_000,
      hookTimeout: 60_000,
    },
  });
}
