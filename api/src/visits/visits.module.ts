import { Module } from '@nestjs/common';
import { AuthModule } from '../auth/auth.module.js';
import { AttachmentStorage } from './attachment-storage.js';
import { VisitsController } from './visits.controller.js';
import { VisitsRepository } from './visits.repository.js';
import { VisitsService } from './visits.service.js';

@Module({
  imports: [AuthModule],
  controllers: [VisitsController],
  providers: [VisitsService, VisitsRepository, AttachmentStorage],
})
export class VisitsModule {}
