import {
  Inject,
  Injectable,
  type BeforeApplicationShutdown,
  type OnApplicationBootstrap,
} from '@nestjs/common';
import { sql } from 'kysely';
import type { Logger } from 'pino';
import { INGEST_CONFIG, type IngestConfig } from '../config/ingest-config.js';
import { numberArrayLiteral, textArrayLiteral } from '../database/array-literals.js';
import { DATABASE, type Database } from '../database/database.js';
import { LOGGER } from '../logging/logger.js';

/** Channels per UPDATE: about 10 ms of building parameters each (see flush). */
const LATEST_VALUES_PER_STATEMENT = 4_000;

interface Latest {
  t: number;
  value: number | null;
  text: string | null;
}

/**
 * Each channel's newest value (`channels.last_time/last_value/last_text`, for "now" tiles).
 * Kept in memory from committed batches and written every few seconds in one statement, so a
 * channel sampled every second costs one UPDATE per interval instead of one per reading.
 */
@Injectable()
export class LatestValuesService implements OnApplicationBootstrap, BeforeApplicationShutdown {
  private pending = new Map<number, Latest>();
  private timer: NodeJS.Timeout | undefined;
  private writing: Promise<void> = Promise.resolve();

  constructor(
    @Inject(DATABASE) private readonly db: Database,
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

  /** Notes committed readings (call after the commit). */
  note(channelId: number, t: number, value: number | null, text: string | null): void {
    const current = this.pending.get(channelId);
    if (!current || current.t < t) this.pending.set(channelId, { t, value, text });
  }

  flush(): Promise<void> {
    this.writing = this.writing.then(async () => {
      if (this.pending.size === 0) return;
      const batch = [...this.pending];
      this.pending = new Map();
      // In slices: the values of 10,000 sites (80,000 channels) turned into one statement's
      // parameters held the event loop, and every PUBACK with it, for 120-660 ms every 5 s.
      for (let from = 0; from < batch.length; from += LATEST_VALUES_PER_STATEMENT) {
        const slice = batch.slice(from, from + LATEST_VALUES_PER_STATEMENT);
        try {
          await this.write(slice);
        } catch (error) {
          this.logger.warn({ err: error }, 'could not write latest channel values; will retry');
          for (const [id, latest] of batch.slice(from)) {
            this.note(id, latest.t, latest.value, latest.text);
          }
          return;
        }
      }
    });
    return this.writing;
  }

  private async write(slice: readonly [number, Latest][]): Promise<void> {
    await sql`
      update channels c set last_time = to_timestamp(l.t), last_value = l.v, last_text = l.x
      from unnest(${numberArrayLiteral(slice.map(([id]) => id))}::int[],
                  ${numberArrayLiteral(slice.map(([, l]) => l.t))}::float8[],
                  ${numberArrayLiteral(slice.map(([, l]) => l.value))}::float8[],
                  ${textArrayLiteral(slice.map(([, l]) => l.text))}::text[])
        as l(id, t, v, x)
      where c.id = l.id and (c.last_time is null or c.last_time < to_timestamp(l.t))`.execute(
      this.db,
    );
  }
}
