import { Module } from '@nestjs/common';
import { AlertNotifier } from './alert-notifier.service.js';
import { CLOCK, systemClock } from './clock.js';
import { MAIL_CONFIG, readMailConfig } from './mail-config.js';
import { MorningSummaryService } from './morning-summary.service.js';
import { OutboxSenderService } from './outbox-sender.service.js';
import { RecipientsRepository } from './recipients.repository.js';
import { SiteDayFiguresRepository } from './site-day-figures.repository.js';

/**
 * Alert mail: who is told (preferences, roles, tenants), in which words, when (quiet hours and
 * the morning summary), through the shared outbox and this process's one sender loop.
 * MAIL_CONFIG is read from the environment once at start-up (tests override the provider).
 */
@Module({
  providers: [
    { provide: MAIL_CONFIG, useFactory: () => readMailConfig(process.env) },
    { provide: CLOCK, useValue: systemClock },
    RecipientsRepository,
    SiteDayFiguresRepository,
    OutboxSenderService,
    AlertNotifier,
    MorningSummaryService,
  ],
  exports: [AlertNotifier, MorningSummaryService, OutboxSenderService, CLOCK, MAIL_CONFIG],
})
export class NotificationsModule {}
