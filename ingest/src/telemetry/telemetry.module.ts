import { Module } from '@nestjs/common';
import { SiteUpdatesModule } from '../site-updates/site-updates.module.js';
import { StorageModule } from '../storage/storage.module.js';
import { TelemetryBatchRepository } from '../storage/telemetry-batch.repository.js';
import { ChannelCache } from './channel-cache.js';
import { GroupCommitWriter } from './group-commit-writer.js';
import { LatestValuesService } from './latest-values.service.js';
import { PackIntakeService } from './pack-intake.service.js';

@Module({
  imports: [StorageModule, SiteUpdatesModule],
  providers: [
    ChannelCache,
    TelemetryBatchRepository,
    GroupCommitWriter,
    LatestValuesService,
    PackIntakeService,
  ],
  exports: [PackIntakeService, GroupCommitWriter],
})
export class TelemetryModule {}
