import { Module } from '@nestjs/common';
import { AuthModule } from '../auth/auth.module.js';
import { EventsController } from './events.controller.js';
import { SiteUpdatesListener } from './site-updates.listener.js';

@Module({
  imports: [AuthModule],
  controllers: [EventsController],
  providers: [SiteUpdatesListener],
  exports: [SiteUpdatesListener],
})
export class EventsModule {}
