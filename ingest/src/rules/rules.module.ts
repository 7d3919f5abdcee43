import { Module } from '@nestjs/common';
import { NotificationsModule } from '../notifications/notifications.module.js';
import { SiteUpdatesModule } from '../site-updates/site-updates.module.js';
import { AlertLifecycleService } from './alert-lifecycle.service.js';
import { AlertsRepository } from './alerts.repository.js';
import { RULES_CONFIG, readRulesConfig } from './rules-config.js';
import { RulesEvaluationService } from './rules-evaluation.service.js';
import { RulesSchedulerService } from './rules-scheduler.service.js';
import { RuleDataRepository } from './rule-data.repository.js';
import { SiteConfigRepository } from './site-config.repository.js';

/**
 * The rules: core's evaluators run over each site's recent data (after commits, debounced) and
 * on a schedule (time-based kinds), and their decisions become alerts with a full history.
 * RULES_CONFIG is read from the environment once at start-up (tests override the provider).
 */
@Module({
  imports: [SiteUpdatesModule, NotificationsModule],
  providers: [
    { provide: RULES_CONFIG, useFactory: () => readRulesConfig(process.env) },
    SiteConfigRepository,
    RuleDataRepository,
    AlertsRepository,
    AlertLifecycleService,
    RulesEvaluationService,
    RulesSchedulerService,
  ],
  exports: [RulesEvaluationService, RulesSchedulerService, AlertLifecycleService],
})
export class RulesModule {}
