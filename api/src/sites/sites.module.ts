import { Module } from '@nestjs/common';
import { AuthModule } from '../auth/auth.module.js';
import { SitesController } from './sites.controller.js';
import { SitesRepository } from './sites.repository.js';
import { SitesService } from './sites.service.js';

@Module({
  imports: [AuthModule],
  controllers: [SitesController],
  providers: [SitesService, SitesRepository],
  exports: [SitesRepository],
})
export class SitesModule {}
