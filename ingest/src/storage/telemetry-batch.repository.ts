import { Inject, Injectable } from '@nestjs/common';
import { sql, type RawBuilder } from 'kysely';
import { WRITER_DATABASE, type Database } from '../database/database.js';
import { SiteUpdates, type SiteUpdatedEvent } from '../site-updates/site-updates.js';
import { ChannelCache } from '../telemetry/channel-cache.js';
import { storedText, storedValue, type PackToStore } from '../telemetry/pack.js';
import { numberArrayLiteral, textArrayLiteral } from '../database/array-literals.js';
import type { ChannelKey } from './channels.repository.js';
import { PartitionsService } from './partitions.service.js';
import { LATE_AFTER_SECONDS, SWITCH_RESCAN_MINUTES } from './rollup-timing.js';

export interface BatchOutcome {
  /** Readings written now. */
  stored: number;
  /** Readings already present (re-sent packs): stored once, counted here. */
  duplicates: number;
  rejected: number;
  /** Events announced by NOTIFY in the transaction; emit them in-process after the commit. */
  updates: SiteUpdatedEvent[];
  /** The rows written (or found already there), column by column. */
  rows: {
    channelIds: number[];
    times: number[];
    values: (number | null)[];
    texts: (string | null)[];
  };
}

/**
 * Writes one group-commit batch in one statement (so one transaction): readings, rejects,
 * late-minute marks for the roll-up, and one NOTIFY per site.
 *
 * Readings go in with `INSERT ... SELECT FROM unnest(arrays) ON CONFLICT DO NOTHING` rather than
 * COPY: COPY is faster on this machine (136–194k vs 106–134k rows/s, ingest-notes.md) but cannot
 * skip duplicates, and re-sent QoS 1 packs must be stored once without failing the batch. The
 * primary key (site_id, channel_id, time) decides what is a duplicate.
 */
@Injectable()
export class TelemetryBatchRepository {
  constructor(
    @Inject(WRITER_DATABASE) private readonly db: Database,
    private readonly channels: ChannelCache,
    private readonly partitions: PartitionsService,
    private readonly siteUpdates: SiteUpdates,
  ) {}

  async commit(batch: readonly PackToStore[]): Promise<BatchOutcome> {
    // Channels seen for the first time are created before the transaction (harmless if it fails).
    const unknown: ChannelKey[] = [];
    const asked = new Set<string>();
    for (const pack of batch) {
      const known = this.channels.site(pack.siteId);
      for (const r of pack.readings) {
        if (known?.has(r.name)) continue;
        const key = `${pack.siteId}\u0000${r.name}`;
        if (asked.has(key)) continue;
        asked.add(key);
        unknown.push({ siteId: pack.siteId, name: r.name, unit: r.unit ?? '', kind: r.valueType });
      }
    }
    await this.channels.load(unknown);

    const sites: string[] = [];
    const channelIds: number[] = [];
    const times: number[] = [];
    const values: (number | null)[] = [];
    const texts: (string | null)[] = [];
    // Late rows (older than the roll-up's lag) and how many minutes after them to revisit.
    const lateSites: string[] = [];
    const lateTimes: number[] = [];
    const lateSpans: number[] = [];
    const lateCandidate = Date.now() / 1000 - (LATE_AFTER_SECONDS - 5);
    let minT = Number.POSITIVE_INFINITY;
    let maxT = Number.NEGATIVE_INFINITY;
    const perSite = new Map<string, { from: number; to: number }>();

    for (const pack of batch) {
      const channels = this.channels.site(pack.siteId);
      let span = perSite.get(pack.siteId);
      for (const r of pack.readings) {
        const channel = channels?.get(r.name);
        if (!channel) throw new Error(`channel ${r.name} of site ${pack.siteId} was not created`);
        const t = r.t;
        sites.push(pack.siteId);
        channelIds.push(channel.id);
        times.push(t);
        values.push(storedValue(r));
        texts.push(storedText(r));
        if (t < minT) minT = t;
        if (t > maxT) maxT = t;
        if (!span) perSite.set(pack.siteId, (span = { from: t, to: t }));
        else {
          if (t < span.from) span.from = t;
          if (t > span.to) span.to = t;
        }
        if (t < lateCandidate) {
          lateSites.push(pack.siteId);
          lateTimes.push(t);
          lateSpans.push(r.valueType === 'boolean' ? SWITCH_RESCAN_MINUTES : 0);
        }
      }
    }
    if (sites.length > 0) await this.partitions.ensureCovering(minT * 1000, maxT * 1000);

    const rejectRows = batch.flatMap((p) =>
      p.rejects.map((r) => ({ gatewayId: p.gatewayId, siteId: p.siteId, at: p.receivedAt, ...r })),
    );

    const at = new Date().toISOString();
    const updates: SiteUpdatedEvent[] = [...perSite].map(([siteId, span]) => ({
      siteId,
      what: ['readings'],
      at,
      from: new Date(span.from * 1000).toISOString(),
      to: new Date(span.to * 1000).toISOString(),
    }));

    // One statement, so one round trip and its own transaction: at saturation every round trip
    // of a BEGIN ... COMMIT waited for a turn of ingest's busy event loop, and those waits, not
    // PostgreSQL, made most of a batch's commit time.
    const writes: RawBuilder<unknown>[] = [];
    if (sites.length > 0) {
      writes.push(sql`readings_written as (
        insert into readings (site_id, channel_id, time, value, text_value)
        select s, c, to_timestamp(t), v, x
        from unnest(${textArrayLiteral(sites)}::uuid[], ${numberArrayLiteral(channelIds)}::int[],
                    ${numberArrayLiteral(times)}::float8[], ${numberArrayLiteral(values)}::float8[],
                    ${textArrayLiteral(texts)}::text[]) as r(s, c, t, v, x)
        on conflict do nothing
        returning 1)`);
    }
    if (rejectRows.length > 0) {
      writes.push(sql`rejects_written as (
        insert into ingest_rejects (gateway_id, site_id, received_at, record_name, reason, raw)
        select * from unnest(${rejectRows.map((r) => r.gatewayId)}::text[],
                             ${rejectRows.map((r) => r.siteId)}::uuid[],
                             ${rejectRows.map((r) => new Date(r.at).toISOString())}::timestamptz[],
                             ${rejectRows.map((r) => r.recordName)}::text[],
                             ${rejectRows.map((r) => r.reason)}::text[],
                             ${rejectRows.map((r) => r.raw)}::text[])
        returning 1)`);
    }
    if (lateSites.length > 0) {
      // The exact test uses the database clock when the statement runs, the same clock the
      // roll-up uses to decide which minutes are closed (see rollup-timing.ts).
      //
      // A mark that is already there is updated, not skipped: the update locks it until this
      // transaction commits, and the sweep skips locked marks (FOR UPDATE SKIP LOCKED). With
      // DO NOTHING, a sweep could consume the existing mark and recompute the minute before
      // these rows were visible, and the rows would never reach their buckets (found by the
      // fault runs, issue 9). Sorted, so concurrent batches lock marks in the same order.
      writes.push(sql`late_marked as (
        insert into rollup_pending (site_id, minute)
        select distinct l.s, m.minute
        from unnest(${lateSites}::uuid[], ${lateTimes}::float8[], ${lateSpans}::int[]) as l(s, t, span)
        cross join lateral generate_series(
          date_trunc('minute', to_timestamp(l.t), 'UTC'),
          date_trunc('minute', to_timestamp(l.t), 'UTC') + l.span * interval '1 minute',
          interval '1 minute') as m(minute)
        where to_timestamp(l.t) < clock_timestamp() - ${LATE_AFTER_SECONDS} * interval '1 second'
        order by 1, 2
        on conflict (site_id, minute) do update set marked_at = excluded.marked_at
        returning 1)`);
    }
    const stored = sites.length > 0 ? sql`(select count(*) from readings_written)::int` : sql`0`;
    // Data-modifying CTEs run whether or not the outer select reads them (PostgreSQL manual
    // 7.8.4); the NOTIFYs are in the select list, so they are sent when this commits.
    const result = await sql<{ stored: number }>`
      ${writes.length > 0 ? sql`with ${sql.join(writes, sql`, `)}` : sql``}
      select ${stored} as stored, ${this.siteUpdates.notifySelect(updates)} as notified`.execute(
      this.db,
    );
    const written = result.rows[0]!.stored;
    return {
      stored: written,
      duplicates: sites.length - written,
      rejected: rejectRows.length,
      updates,
      rows: { channelIds, times, values, texts },
    };
  }
}
