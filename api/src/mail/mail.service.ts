import { Inject, Injectable, Logger, type OnApplicationShutdown } from '@nestjs/common';
import { type Database, enqueueMail, type OutboxMessage, OutboxSender } from '@wellkept/db';
import { API_CONFIG, type ApiConfig } from '../config/api-config.js';
import { InjectDb } from '../database/database.module.js';

/**
 * Outgoing mail through the shared outbox (db/src/mail): the message is written first, then
 * a send round is triggered right away; the sender's timer retries anything that failed.
 */
@Injectable()
export class MailService implements OnApplicationShutdown {
  private readonly logger = new Logger('mail');
  private readonly sender: OutboxSender;

  constructor(
    @InjectDb() private readonly db: Database,
    @Inject(API_CONFIG) config: ApiConfig,
  ) {
    this.sender = new OutboxSender(db, config.mail, { log: (m) => this.logger.warn(m) });
    this.sender.start();
  }

  /** Writes the message to the outbox (inside `db` when given) and returns its row id. */
  async enqueue(message: OutboxMessage, db: Database = this.db): Promise<number> {
    const { id } = await enqueueMail(db, message);
    return id;
  }

  /** Starts a send round now (call after the enqueueing transaction committed). */
  flush(): void {
    void this.sender.trigger();
  }

  async onApplicationShutdown(): Promise<void> {
    await this.sender.stop();
  }
}
