import { nodeProject } from '../vitest.node-project.js';

/** Tests that run whole services as processes, kill and restart them (fault runs, two nodes). */
export const SYSTEM_TESTS = ['test/faults/**/*.test.ts', 'test/cluster/**/*.test.ts'];

export default nodeProject('ingest-system', { include: SYSTEM_TESTS, groupOrder: 1 });
