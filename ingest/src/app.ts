import { NestFactory } from '@nestjs/core';
import { FastifyAdapter, type NestFastifyApplication } from '@nestjs/platform-fastify';
import type { Logger } from 'pino';
import { AppModule } from './app.module.js';
import type { IngestConfig } from './config/ingest-config.js';
import { PinoNestLogger } from './logging/logger.js';

/**
 * Builds and starts the service: HTTP (/health, /metrics) on the configured port and the MQTT
 * listeners (started by BrokerService when the application boots). Used by main.ts and tests.
 */
export async function startIngest(
  config: IngestConfig,
  logger: Logger,
): Promise<NestFastifyApplication> {
  const app = await NestFactory.create<NestFastifyApplication>(
    AppModule.forRoot(config, logger),
    new FastifyAdapter(),
    { logger: new PinoNestLogger(logger), abortOnError: false },
  );
  await app.listen(config.httpPort, config.host);
  return app;
}
