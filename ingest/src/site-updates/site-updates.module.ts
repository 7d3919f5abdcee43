import { Module } from '@nestjs/common';
import { SiteUpdates } from './site-updates.js';

@Module({ providers: [SiteUpdates], exports: [SiteUpdates] })
export class SiteUpdatesModule {}
