import { Module, type DynamicModule } from '@nestjs/common';
import { EventEmitterModule } from '@nestjs/event-emitter';
import type { Logger } from 'pino';
import { BrokerModule } from './broker/broker.module.js';
import { ConfigModule } from './config/config.module.js';
import type { IngestConfig } from './config/ingest-config.js';
import { HealthModule } from './health/health.module.js';
import { MetricsModule } from './metrics/metrics.module.js';
import { NotificationsModule } from './notifications/notifications.module.js';
import { RulesModule } from './rules/rules.module.js';
import { StorageModule } from './storage/storage.module.js';

/** The ingest service: broker, telemetry path, storage upkeep, health and metrics. */
@Module({})
export class AppModule {
  static forRoot(config: IngestConfig, logger: Logger): DynamicModule {
    return {
      module: AppModule,
      imports: [
        ConfigModule.forRoot(config, logger),
        EventEmitterModule.forRoot(),
        MetricsModule,
        BrokerModule,
        StorageModule,
        HealthModule,
        NotificationsModule,
        RulesModule,
      ],
    };
  }
}
