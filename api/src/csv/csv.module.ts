import { Module } from '@nestjs/common';
import { AuthModule } from '../auth/auth.module.js';
import { ReadingsModule } from '../readings/readings.module.js';
import { CsvController } from './csv.controller.js';
import { CsvExportRepository } from './csv-export.repository.js';
import { CsvService } from './csv.service.js';
import { HistoryWriterRepository } from './history-writer.repository.js';

@Module({
  imports: [AuthModule, ReadingsModule],
  controllers: [CsvController],
  providers: [CsvService, CsvExportRepository, HistoryWriterRepository],
})
export class CsvModule {}
