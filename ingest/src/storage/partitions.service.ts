import {
  Inject,
  Injectable,
  type BeforeApplicationShutdown,
  type OnApplicationBootstrap,
} from '@nestjs/common';
import { ensureTimePartitions, partitionEnd, partitionsOf } from '@wellkept/db';
import { sql } from 'kysely';
import type { Logger } from 'pino';
import { INGEST_CONFIG, type IngestConfig } from '../config/ingest-config.js';
import { DATABASE, type Database } from '../database/database.js';
import { LOGGER } from '../logging/logger.js';

const DAY_MS = 86_400_000;
/** Partitions are kept ready this far ahead of now (records may be up to 5 minutes ahead). */
const AHEAD_DAYS = 3;
/** ...and this far back: store-and-forward packs up to 30 days old are accepted. */
const BEHIND_DAYS = 31;
const MAINTENANCE_INTERVAL_MS = 3_600_000;

/**
 * Keeps the time partitions of `readings` (daily) and `minute_buckets` (monthly) ready ahead of
 * the data, and drops partitions older than each table's retention (whole partitions: no
 * DELETE, no bloat). The writer also asks for partitions covering each batch, so a record never
 * meets a missing partition even if the hourly maintenance has not run yet.
 */
@Injectable()
export class PartitionsService implements OnApplicationBootstrap, BeforeApplicationShutdown {
  private coveredFrom = Number.POSITIVE_INFINITY;
  private coveredTo = Number.NEGATIVE_INFINITY;
  private timer: NodeJS.Timeout | undefined;

  constructor(
    @Inject(DATABASE) private readonly db: Database,
    @Inject(INGEST_CONFIG) private readonly config: IngestConfig,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {}

  async onApplicationBootstrap(): Promise<void> {
    await this.maintain();
    this.timer = setInterval(() => {
      this.maintain().catch((error: unknown) =>
        this.logger.error({ err: error }, 'partition maintenance failed'),
      );
    }, MAINTENANCE_INTERVAL_MS);
    this.timer.unref();
  }

  beforeApplicationShutdown(): void {
    clearInterval(this.timer);
  }

  /** Creates what is missing around now and drops partitions past their retention. */
  async maintain(now = Date.now()): Promise<void> {
    await this.ensureCovering(now - BEHIND_DAYS * DAY_MS, now + AHEAD_DAYS * DAY_MS);
    const dropped = await this.dropExpired(now);
    if (dropped.length > 0) this.logger.info({ dropped }, 'dropped expired partitions');
  }

  /** Makes sure partitions exist for every instant in [fromMs, toMs]. Cheap when they do. */
  async ensureCovering(fromMs: number, toMs: number): Promise<void> {
    if (fromMs >= this.coveredFrom && toMs < this.coveredTo) return;
    const from = new Date(Math.min(fromMs, this.coveredFrom));
    const to = new Date(Math.max(toMs + 1, this.coveredTo));
    await ensureTimePartitions(this.db, 'readings', from, to);
    await ensureTimePartitions(this.db, 'minute_buckets', from, to);
    // Partition bounds are whole UTC days, so the covered span is at least [from, to).
    this.coveredFrom = from.getTime();
    this.coveredTo = to.getTime();
  }

  /**
   * Detaches and drops the partitions wholly older than their table's retention: `readings` by
   * day (INGEST_RAW_RETENTION_DAYS), `minute_buckets` by month (INGEST_MINUTE_RETENTION_DAYS).
   */
  async dropExpired(now = Date.now()): Promise<string[]> {
    const dropped: string[] = [];
    const retentions = [
      ['readings', this.config.rawRetentionDays],
      ['minute_buckets', this.config.minuteRetentionDays],
    ] as const;
    for (const [table, days] of retentions) {
      const cutoff = now - days * DAY_MS;
      for (const { name, start } of await partitionsOf(this.db, table)) {
        if (partitionEnd(table, start).getTime() > cutoff) continue;
        // CONCURRENTLY keeps writers to other partitions running while the partition detaches.
        await sql`alter table ${sql.table(table)} detach partition ${sql.table(name)} concurrently`.execute(
          this.db,
        );
        await sql`drop table ${sql.table(name)}`.execute(this.db);
        dropped.push(name);
      }
      if (dropped.length > 0) this.coveredFrom = Math.max(this.coveredFrom, cutoff);
    }
    return dropped;
  }
}
