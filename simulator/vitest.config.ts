import { nodeProject } from '../vitest.node-project.js';

export default nodeProject('simulator');
