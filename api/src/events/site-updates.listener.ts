import {
  type BeforeApplicationShutdown,
  Inject,
  Injectable,
  Logger,
  type OnApplicationShutdown,
  type OnModuleInit,
} from '@nestjs/common';
import pg from 'pg';
import { Subject } from 'rxjs';
import { z } from 'zod';
import { API_CONFIG, type ApiConfig } from '../config/api-config.js';

export const SITE_UPDATES_CHANNEL = 'site_updates';

const siteUpdate = z.object({
  siteId: z.string(),
  what: z.array(z.enum(['readings', 'pump_runs', 'alerts', 'gateway'])),
  at: z.string(),
});
export type SiteUpdate = z.infer<typeof siteUpdate>;

/**
 * One `LISTEN site_updates` connection per API process, fanned out in memory to every open
 * event stream. Reconnects with backoff when the database goes away; streams stay open and
 * simply hear nothing until it is back.
 */
@Injectable()
export class SiteUpdatesListener
  implements OnModuleInit, BeforeApplicationShutdown, OnApplicationShutdown
{
  private readonly logger = new Logger('site-updates');
  readonly updates = new Subject<SiteUpdate>();
  /** Emits once when the API starts shutting down: open event streams end then. */
  readonly closing = new Subject<void>();
  private client: pg.Client | undefined;
  private retryTimer: NodeJS.Timeout | undefined;
  private retryDelayMs = 500;
  private stopped = false;

  constructor(@Inject(API_CONFIG) private readonly config: ApiConfig) {}

  /** Starts listening in the background: the API serves requests even while the database is away. */
  onModuleInit(): void {
    void this.connect();
  }

  /** Resolves once listening (or after a failed attempt that schedules a retry). */
  private async connect(): Promise<void> {
    if (this.stopped) return;
    const client = new pg.Client({
      connectionString: this.config.databaseUrl,
      application_name: 'wellkept-api-listen',
    });
    client.on('notification', (message) => {
      if (message.channel !== SITE_UPDATES_CHANNEL || !message.payload) return;
      try {
        const parsed = siteUpdate.safeParse(JSON.parse(message.payload));
        if (parsed.success) this.updates.next(parsed.data);
      } catch {
        // A payload that is not JSON is someone else's message; ignore it.
      }
    });
    client.on('error', (error) => {
      this.logger.warn(`listening connection lost: ${error.message}`);
      this.scheduleReconnect(client);
    });
    client.on('end', () => this.scheduleReconnect(client));
    try {
      await client.connect();
      await client.query(`listen ${SITE_UPDATES_CHANNEL}`);
      this.client = client;
      this.retryDelayMs = 500;
    } catch (error) {
      this.logger.warn(`cannot listen for site updates yet: ${(error as Error).message}`);
      this.scheduleReconnect(client);
    }
  }

  private scheduleReconnect(client: pg.Client): void {
    if (this.stopped || this.retryTimer) return;
    if (this.client === client) this.client = undefined;
    void client.end().catch(() => undefined);
    this.retryTimer = setTimeout(() => {
      this.retryTimer = undefined;
      void this.connect();
    }, this.retryDelayMs);
    this.retryTimer.unref();
    // Capped at 5 s: live updates stop while this connection is away, and a LISTEN
    // connection is cheap to retry.
    this.retryDelayMs = Math.min(this.retryDelayMs * 2, 5_000);
  }

  /**
   * Ends every open event stream before the HTTP server closes: the server waits for open
   * responses, and an event stream never ends by itself, so without this a SIGTERM left the API
   * running until it was killed (found by the fault runs, issue 9). Browsers reconnect to the
   * next API process on their own (EventSource).
   */
  beforeApplicationShutdown(): void {
    this.closing.next();
    this.closing.complete();
  }

  async onApplicationShutdown(): Promise<void> {
    this.stopped = true;
    if (this.retryTimer) clearTimeout(this.retryTimer);
    this.updates.complete();
    await this.client?.end().catch(() => undefined);
  }
}
