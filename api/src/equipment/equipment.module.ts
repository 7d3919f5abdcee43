import { Module } from '@nestjs/common';
import { AuthModule } from '../auth/auth.module.js';
import { EquipmentController } from './equipment.controller.js';
import { EquipmentRepository } from './equipment.repository.js';
import { EquipmentService } from './equipment.service.js';

@Module({
  imports: [AuthModule],
  controllers: [EquipmentController],
  providers: [EquipmentService, EquipmentRepository],
})
export class EquipmentModule {}
