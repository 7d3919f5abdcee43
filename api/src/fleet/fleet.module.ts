import { Module } from '@nestjs/common';
import { AuthModule } from '../auth/auth.module.js';
import { FleetController } from './fleet.controller.js';
import { FleetRepository } from './fleet.repository.js';
import { FleetService } from './fleet.service.js';

@Module({
  imports: [AuthModule],
  controllers: [FleetController],
  providers: [FleetService, FleetRepository],
})
export class FleetModule {}
