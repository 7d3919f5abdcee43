import { nodeProject } from '../vitest.node-project.js';
import { SYSTEM_TESTS } from './vitest.system.config.js';

export default nodeProject('ingest', { exclude: SYSTEM_TESTS });
