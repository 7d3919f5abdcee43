import { Module } from '@nestjs/common';
import { AuthModule } from '../auth/auth.module.js';
import { PumpRunsController } from './pump-runs.controller.js';
import { PumpRunsRepository } from './pump-runs.repository.js';

@Module({
  imports: [AuthModule],
  controllers: [PumpRunsController],
  providers: [PumpRunsRepository],
  exports: [PumpRunsRepository],
})
export class PumpRunsModule {}
