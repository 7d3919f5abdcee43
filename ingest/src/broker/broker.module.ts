import { Module } from '@nestjs/common';
import { GatewaysModule } from '../gateways/gateways.module.js';
import { TelemetryModule } from '../telemetry/telemetry.module.js';
import { BrokerService } from './broker.service.js';
import { GatewayAuthenticator } from './gateway-authenticator.service.js';

@Module({
  imports: [GatewaysModule, TelemetryModule],
  providers: [GatewayAuthenticator, BrokerService],
  exports: [BrokerService],
})
export class BrokerModule {}
