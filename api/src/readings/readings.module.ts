import { Module } from '@nestjs/common';
import { AuthModule } from '../auth/auth.module.js';
import { ReadingsController } from './readings.controller.js';
import { ReadingsRepository } from './readings.repository.js';
import { SeriesService } from './series.service.js';

@Module({
  imports: [AuthModule],
  controllers: [ReadingsController],
  providers: [ReadingsRepository, SeriesService],
  exports: [ReadingsRepository],
})
export class ReadingsModule {}
