import {
  Inject,
  Injectable,
  type BeforeApplicationShutdown,
  type OnApplicationBootstrap,
} from '@nestjs/common';
import type { Logger } from 'pino';
import { INGEST_CONFIG, type IngestConfig } from '../config/ingest-config.js';
import { LOGGER } from '../logging/logger.js';
import { SiteUpdates } from '../site-updates/site-updates.js';
import { GatewaysRepository } from './gateways.repository.js';

interface Change {
  id: string;
  siteId: string;
  online: boolean;
  at: Date;
}

/**
 * Gateway last-seen time and online state. Last-seen moves with every packet but is written in
 * one statement every few seconds (not once per pack); online/offline changes (connect,
 * disconnect, `status` messages and wills) are written promptly, in the order they happened.
 */
@Injectable()
export class GatewayPresenceService implements OnApplicationBootstrap, BeforeApplicationShutdown {
  private readonly lastSeen = new Map<string, number>();
  private changes: Change[] = [];
  private writing: Promise<void> = Promise.resolve();
  private timer: NodeJS.Timeout | undefined;

  constructor(
    private readonly gateways: GatewaysRepository,
    private readonly siteUpdates: SiteUpdates,
    @Inject(INGEST_CONFIG) private readonly config: IngestConfig,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {}

  onApplicationBootstrap(): void {
    this.timer = setInterval(() => void this.flush(), this.config.lastSeenIntervalMs);
    this.timer.unref();
  }

  async beforeApplicationShutdown(): Promise<void> {
    clearInterval(this.timer);
    await this.flush();
  }

  seen(gatewayId: string, at = Date.now()): void {
    this.lastSeen.set(gatewayId, at);
  }

  setOnline(gatewayId: string, siteId: string, online: boolean, at = new Date()): void {
    this.lastSeen.set(gatewayId, at.getTime());
    this.changes.push({ id: gatewayId, siteId, online, at });
    void this.flush();
  }

  /** Writes pending changes; writes are chained so they land in order. */
  flush(): Promise<void> {
    this.writing = this.writing.then(async () => {
      const changes = latestPerGateway(this.changes);
      this.changes = [];
      const seen = new Map(this.lastSeen);
      this.lastSeen.clear();
      try {
        if (changes.length > 0) this.siteUpdates.emit(await this.gateways.setOnline(changes));
        await this.gateways.touchLastSeen(seen);
      } catch (error) {
        this.logger.warn({ err: error }, 'could not record gateway presence; will retry');
        this.changes.unshift(...changes);
        for (const [id, at] of seen) {
          if ((this.lastSeen.get(id) ?? 0) < at) this.lastSeen.set(id, at);
        }
      }
    });
    return this.writing;
  }
}

function latestPerGateway(changes: readonly Change[]): Change[] {
  const latest = new Map<string, Change>();
  for (const c of changes) latest.set(c.id, c);
  return [...latest.values()];
}
