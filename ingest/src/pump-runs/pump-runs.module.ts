import { Module } from '@nestjs/common';
import { SiteUpdatesModule } from '../site-updates/site-updates.module.js';
import { PumpRunsRepository } from './pump-runs.repository.js';
import { PumpRunsService } from './pump-runs.service.js';

@Module({
  imports: [SiteUpdatesModule],
  providers: [PumpRunsRepository, PumpRunsService],
  exports: [PumpRunsService],
})
export class PumpRunsModule {}
