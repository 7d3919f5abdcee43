import {
  Inject,
  Injectable,
  type BeforeApplicationShutdown,
  type OnApplicationBootstrap,
} from '@nestjs/common';
import { sql } from 'kysely';
import type { Logger } from 'pino';
import { INGEST_CONFIG, type IngestConfig } from '../config/ingest-config.js';
import { DATABASE, type Database } from '../database/database.js';
import { LOGGER } from '../logging/logger.js';
import { MetricsService } from '../metrics/metrics.service.js';
import { PumpRunsService } from '../pump-runs/pump-runs.service.js';
import { BucketsRepository } from './buckets.repository.js';
import { SWEEP_LAG_SECONDS } from './rollup-timing.js';

/** At most this many minutes are rolled up per transaction (catching up after downtime). */
const CHUNK_MINUTES = 10;
/** Pending late minutes handled per transaction. */
const PENDING_CHUNK = 5_000;
/** Only one ingest node sweeps at a time (key of a transaction-level advisory lock). */
const SWEEP_LOCK_KEY = 7_301_001;
const STATE_NAME = 'minute';

export interface SweepResult {
  /** Minutes [from, to) rolled up as they closed. */
  closed: { from: Date; to: Date } | null;
  /** (site, minute) pairs recomputed because late rows arrived. */
  lateMinutes: number;
  /** Sites whose pump runs were re-derived. */
  pumpSites: number;
}

/**
 * Keeps minute, hour and day buckets (and pump runs) up to date by sweeping, not by upserting
 * on every batch.
 *
 * Why: on this machine an upsert of the minute roll-up inside each ingest batch cut ingest from
 * 106k to 47k rows/s, while building the same roll-up afterwards from raw rows took 1.8 s per
 * million rows, about 8× cheaper (shared/ingest-notes.md). So the write path only stores raw
 * rows, and this sweep, every INGEST_ROLLUP_INTERVAL_MS (10 s by default):
 *  1. rolls up the minutes that closed since the last sweep (a watermark kept in rollup_state,
 *     so a restart resumes) from raw rows into minute buckets, and adds them to their hour and
 *     day buckets;
 *  2. recomputes the minutes that received late rows (listed in rollup_pending by the writer)
 *     from raw rows, and their hours and days whole from minute buckets;
 *  3. re-derives pump runs for the sites touched, in the same transaction as 1 or 2 (a run
 *     still open keeps what its samples before the watermark add up to, see PumpRunsService).
 * Staleness: buckets trail raw readings by 30–40 s after each minute closes (rollup-timing.ts).
 */
@Injectable()
export class RollupService implements OnApplicationBootstrap, BeforeApplicationShutdown {
  private timer: NodeJS.Timeout | undefined;
  private running: Promise<unknown> | null = null;
  private stopped = false;

  constructor(
    @Inject(DATABASE) private readonly db: Database,
    private readonly buckets: BucketsRepository,
    private readonly pumpRuns: PumpRunsService,
    private readonly metrics: MetricsService,
    @Inject(INGEST_CONFIG) private readonly config: IngestConfig,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {}

  onApplicationBootstrap(): void {
    const tick = () => {
      if (this.stopped) return;
      this.timer = setTimeout(() => {
        this.sweep()
          .catch((error: unknown) => this.logger.error({ err: error }, 'roll-up sweep failed'))
          .finally(tick);
      }, this.config.rollupIntervalMs);
      this.timer.unref();
    };
    tick();
  }

  async beforeApplicationShutdown(): Promise<void> {
    this.stopped = true;
    clearTimeout(this.timer);
    await this.running?.catch(() => undefined);
  }

  /** One sweep; concurrent calls share the running one. */
  sweep(): Promise<SweepResult> {
    if (this.running) return this.running as Promise<SweepResult>;
    const started = process.hrtime.bigint();
    const run = this.sweepOnce().finally(() => {
      this.running = null;
      this.metrics.rollupSeconds.observe(Number(process.hrtime.bigint() - started) / 1e9);
    });
    this.running = run;
    return run;
  }

  private async sweepOnce(): Promise<SweepResult> {
    const result: SweepResult = { closed: null, lateMinutes: 0, pumpSites: 0 };
    // Pump runs are re-derived inside the transaction that consumes the watermark step or the
    // late-minute marks that asked for it; their events go out after that commit.
    const rederive = async (trx: Database, pumpFrom: Map<string, Date>, watermark: Date) => {
      if (pumpFrom.size === 0) return [];
      const { sites, updates } = await this.pumpRuns.rederiveIn(trx, pumpFrom, watermark);
      result.pumpSites += sites;
      return updates;
    };
    const touch = (pumpFrom: Map<string, Date>, siteId: string, from: Date) => {
      const known = pumpFrom.get(siteId);
      if (!known || from < known) pumpFrom.set(siteId, from);
    };

    // 1. Closed minutes, chunk by chunk, each chunk with its watermark in one transaction.
    for (;;) {
      const chunk = await this.db.transaction().execute(async (trx) => {
        if (!(await tryLock(trx))) return null;
        const { rows } = await sql<{ watermark: Date | null; closed_to: Date }>`
          select (select watermark from rollup_state where name = ${STATE_NAME}) as watermark,
                 date_trunc('minute', now() - ${SWEEP_LAG_SECONDS} * interval '1 second', 'UTC') as closed_to`.execute(
          trx,
        );
        const closedTo = rows[0]!.closed_to;
        let from = rows[0]!.watermark;
        if (!from) {
          from = await firstMinute(trx, closedTo);
          await sql`insert into rollup_state (name, watermark) values (${STATE_NAME}, ${from})`.execute(
            trx,
          );
        }
        if (from >= closedTo) return null;
        const to = new Date(Math.min(closedTo.getTime(), from.getTime() + CHUNK_MINUTES * 60_000));
        await this.buckets.rollUpMinutes(trx, from, to);
        await this.buckets.accumulateMinutes(trx, from, to);
        await sql`update rollup_state set watermark = ${to}, updated_at = now() where name = ${STATE_NAME}`.execute(
          trx,
        );
        const { rows: pumpSites } = await sql<{ site_id: string }>`
          select distinct c.site_id from minute_buckets m join channels c on c.id = m.channel_id
          where m.bucket_start >= ${from} and m.bucket_start < ${to} and c.name like 'pump/%'`.execute(
          trx,
        );
        const pumpFrom = new Map<string, Date>();
        for (const { site_id } of pumpSites) touch(pumpFrom, site_id, from);
        return { from, to, updates: await rederive(trx, pumpFrom, to) };
      });
      if (!chunk) break;
      this.pumpRuns.emit(chunk.updates);
      result.closed = { from: result.closed?.from ?? chunk.from, to: chunk.to };
      if (this.stopped) break;
    }

    // 2. Minutes that received late rows, up to the watermark.
    for (;;) {
      const handled = await this.db.transaction().execute(async (trx) => {
        if (!(await tryLock(trx))) return { count: 0, updates: [] };
        // Marks locked by a batch still committing are skipped: that batch's rows are not
        // visible yet, so recomputing now would miss them; the next sweep takes the mark.
        const { rows: state } = await sql<{ watermark: Date | null }>`
          select watermark from rollup_state where name = ${STATE_NAME}`.execute(trx);
        const watermark = state[0]?.watermark;
        if (!watermark) return { count: 0, updates: [] };
        const { rows } = await sql<{ site_id: string; minute: Date }>`
          delete from rollup_pending
          where (site_id, minute) in (
            select site_id, minute from rollup_pending
            where minute < ${watermark}
            order by minute limit ${PENDING_CHUNK}
            for update skip locked)
          returning site_id, minute`.execute(trx);
        if (rows.length === 0) return { count: 0, updates: [] };
        await this.buckets.recomputeMinutes(
          trx,
          rows.map((r) => r.site_id),
          rows.map((r) => r.minute),
        );
        const pumpFrom = new Map<string, Date>();
        for (const r of rows) touch(pumpFrom, r.site_id, r.minute);
        return { count: rows.length, updates: await rederive(trx, pumpFrom, watermark) };
      });
      this.pumpRuns.emit(handled.updates);
      result.lateMinutes += handled.count;
      if (handled.count < PENDING_CHUNK || this.stopped) break;
    }
    return result;
  }
}

async function tryLock(trx: Database): Promise<boolean> {
  const { rows } = await sql<{ locked: boolean }>`
    select pg_try_advisory_xact_lock(${SWEEP_LOCK_KEY}) as locked`.execute(trx);
  return rows[0]?.locked === true;
}

/** Where a new database starts rolling up: its oldest reading, or now. */
async function firstMinute(trx: Database, closedTo: Date): Promise<Date> {
  const { rows } = await sql<{ first: Date | null }>`
    select date_trunc('minute', min(time), 'UTC') as first from readings`.execute(trx);
  const first = rows[0]?.first;
  return first && first < closedTo ? first : closedTo;
}
