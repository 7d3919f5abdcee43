import { Module } from '@nestjs/common';
import { PumpRunsModule } from '../pump-runs/pump-runs.module.js';
import { SiteUpdatesModule } from '../site-updates/site-updates.module.js';
import { BucketsRepository } from './buckets.repository.js';
import { ChannelsRepository } from './channels.repository.js';
import { PartitionsService } from './partitions.service.js';
import { RollupService } from './rollup.service.js';

@Module({
  imports: [SiteUpdatesModule, PumpRunsModule],
  providers: [ChannelsRepository, PartitionsService, BucketsRepository, RollupService],
  exports: [ChannelsRepository, PartitionsService, RollupService],
})
export class StorageModule {}
