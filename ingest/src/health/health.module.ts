import { Module } from '@nestjs/common';
import { BrokerModule } from '../broker/broker.module.js';
import { HealthController } from './health.controller.js';

@Module({ imports: [BrokerModule], controllers: [HealthController] })
export class HealthModule {}
