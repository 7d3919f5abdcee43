import 'reflect-metadata';
import { getHeapStatistics } from 'node:v8';
import { startIngest } from './app.js';
import { readIngestConfig } from './config/ingest-config.js';
import { ingestHeapMegabytes } from './config/node-args.js';
import { createLogger } from './logging/logger.js';

let config;
let heapMb;
try {
  config = readIngestConfig();
  heapMb = ingestHeapMegabytes();
} catch (error) {
  console.error((error as Error).message);
  process.exit(1);
}
const logger = createLogger(config.logLevel);
// The heap cap is a flag of the node command (config/node-args.ts): say so when it is missing.
const heapLimitMb = getHeapStatistics().heap_size_limit / 2 ** 20;
if (heapLimitMb > heapMb * 1.5) {
  logger.warn(
    { heapLimitMb: Math.round(heapLimitMb), wantedMb: heapMb },
    'ingest was started without its heap cap (node --max-old-space-size): memory may grow well past INGEST_HEAP_MB',
  );
}
try {
  const app = await startIngest(config, logger);
  // SIGTERM/SIGINT: stop accepting, commit what is queued, close connections, then the pool.
  app.enableShutdownHooks();
  logger.info({ http: config.httpPort }, 'ingest ready');
} catch (error) {
  logger.fatal({ err: error }, 'ingest failed to start');
  process.exit(1);
}
