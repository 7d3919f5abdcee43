import { Module } from '@nestjs/common';
import { SiteUpdatesModule } from '../site-updates/site-updates.module.js';
import { GatewayPresenceService } from './gateway-presence.service.js';
import { GatewaysRepository } from './gateways.repository.js';

@Module({
  imports: [SiteUpdatesModule],
  providers: [GatewaysRepository, GatewayPresenceService],
  exports: [GatewaysRepository, GatewayPresenceService],
})
export class GatewaysModule {}
