import {
  Inject,
  Injectable,
  type BeforeApplicationShutdown,
  type OnApplicationBootstrap,
} from '@nestjs/common';
import { OutboxSender } from '@wellkept/db';
import type { Logger } from 'pino';
import { DATABASE, type Database } from '../database/database.js';
import { LOGGER } from '../logging/logger.js';
import { MAIL_CONFIG, type MailConfig } from './mail-config.js';

/**
 * The one outbox sender loop of this process (db/src/mail): a round every
 * MAIL_SEND_INTERVAL_S for held and retried messages, and one right after new mail is written.
 * An SMTP outage only delays mail: failed messages stay in the outbox and are retried with
 * backoff; a message is marked sent once.
 */
@Injectable()
export class OutboxSenderService implements OnApplicationBootstrap, BeforeApplicationShutdown {
  private readonly sender: OutboxSender;

  constructor(
    @Inject(DATABASE) db: Database,
    @Inject(MAIL_CONFIG) config: MailConfig,
    @Inject(LOGGER) logger: Logger,
  ) {
    this.sender = new OutboxSender(db, config.smtp, {
      intervalSeconds: config.sendIntervalSeconds,
      maxAttempts: config.maxAttempts,
      retryDelay: config.retryDelay,
      log: (message) => logger.warn(message),
    });
  }

  onApplicationBootstrap(): void {
    this.sender.start();
  }

  async beforeApplicationShutdown(): Promise<void> {
    await this.sender.stop();
  }

  /** Sends what is due now (call after the transaction that wrote mail has committed). */
  trigger(): Promise<void> {
    return this.sender.trigger();
  }
}
