import { nodeProject } from '../vitest.node-project.js';

export default nodeProject('db', { timeoutMs: 120_000 });
