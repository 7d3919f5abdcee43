import { Module } from '@nestjs/common';
import { AuthModule } from '../auth/auth.module.js';
import { GatewaysController } from './gateways.controller.js';
import { GatewaysService } from './gateways.service.js';

@Module({ imports: [AuthModule], controllers: [GatewaysController], providers: [GatewaysService] })
export class GatewaysModule {}
