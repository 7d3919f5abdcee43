import 'reflect-metadata';
import { startIngest } from './app.js';
import { readIngestConfig } from './config/ingest-config.js';
import { createLogger } from './logging/logger.js';

let config;
try {
  config = readIngestConfig();
} catch (error) {
  console.error((error as Error).message);
  process.exit(1);
}
const logger = createLogger(config.logLevel);
try {
  const app = await startIngest(config, logger);
  // SIGTERM/SIGINT: stop accepting, commit what is queued, close connections, then the pool.
  app.enableShutdownHooks();
  logger.info({ http: config.httpPort }, 'ingest ready');
} catch (error) {
  logger.fatal({ err: error }, 'ingest failed to start');
  process.exit(1);
}
