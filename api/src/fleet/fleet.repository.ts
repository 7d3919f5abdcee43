import { Injectable } from '@nestjs/common';
import type { StoredTankDimensions } from '@wellkept/core';
import type { Database } from '@wellkept/db';
import { sql } from 'kysely';
import type { SessionUser } from '../access/session-user.js';
import { InjectDb } from '../database/database.module.js';

export interface FleetSiteRow {
  id: string;
  name: string;
  locality: string;
  reporting_interval_s: number;
  last_seen_at: Date | null;
  gateway_count: number;
  open_alerts: number;
  act_alerts: number;
  alert_kinds: string[] | null;
  chemistry: 'flooded' | 'agm' | 'gel' | 'lifepo4' | null;
  nominal_voltage_v: number | null;
  capacity_ah: number | null;
  /** 0 act, 1 silent, 2 watch, 3 steady (the order of HEALTH). */
  rank: number;
}

export interface FleetChannelRow {
  site_id: string;
  id: number;
  name: string;
  unit: string;
  last_time: Date | null;
  last_value: number | null;
}

/** A storage tank with its dimensions as core reads them (`tankGeometryFrom`). */
export interface FleetTankRow extends StoredTankDimensions {
  site_id: string;
  key: string;
  sensor_offset_m: number;
}

/**
 * The few set-based queries behind the fleet overview. Each reads one row (or a day of hourly
 * rows) per site whatever the history's length: latest values come from `channels.last_*`,
 * not from readings.
 */
@Injectable()
export class FleetRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  /**
   * One page of the visible sites, worst first, with what decides their health, and how many
   * sites are in each health state. The ranking happens here, in SQL, so the page costs the
   * same whatever the fleet's size; `rank` follows the same rules as FleetService.health.
   */
  async sites(
    user: SessionUser,
    page: { limit: number; offset: number },
  ): Promise<{ rows: FleetSiteRow[]; counts: { rank: number; n: number }[] }> {
    const ranked = sql`
      with visible as (
        select s.id, s.name, s.locality, s.reporting_interval_s
          from sites s
         where s.company_id = ${user.companyId} ${ownerFilter(user)}
      ), ranked as (
        select v.*, g.last_seen_at, coalesce(g.gateway_count, 0)::int as gateway_count,
               coalesce(a.open_alerts, 0)::int as open_alerts,
               coalesce(a.act_alerts, 0)::int as act_alerts, a.alert_kinds,
               case
                 when coalesce(a.act_alerts, 0) > 0 then 0
                 when coalesce(g.gateway_count, 0) = 0 or g.last_seen_at is null
                   or coalesce(a.silent_alerts, 0) > 0
                   or g.last_seen_at < now() - make_interval(secs => greatest(${SILENT_AFTER_INTERVALS} * v.reporting_interval_s, ${SILENT_AFTER_MIN_S}))
                   then 1
                 when coalesce(a.open_alerts, 0) > 0 then 2
                 else 3
               end as rank
          from visible v
          left join lateral (
            select max(last_seen_at) as last_seen_at, count(*) as gateway_count
              from gateways where site_id = v.id and revoked_at is null
          ) g on true
          left join lateral (
            -- A gateway-silent alert means "no data": it ranks the site silent, not act.
            select count(*) as open_alerts,
                   count(*) filter (where severity = 'act' and kind <> 'gateway_silent') as act_alerts,
                   count(*) filter (where kind = 'gateway_silent') as silent_alerts,
                   array_agg(distinct kind) as alert_kinds
              from alerts where site_id = v.id and status <> 'cleared'
          ) a on true
      )`;
    const [page_, counts] = await Promise.all([
      sql<FleetSiteRow>`${ranked}
        select r.*, b.chemistry, b.nominal_voltage_v, b.capacity_ah
          from ranked r left join battery_banks b on b.site_id = r.id
         order by r.rank, r.name, r.id
         limit ${page.limit} offset ${page.offset}`.execute(this.db),
      sql<{
        rank: number;
        n: number;
      }>`${ranked} select rank, count(*)::int as n from ranked group by rank`.execute(this.db),
    ]);
    return { rows: page_.rows, counts: counts.rows };
  }

  /** Latest battery and tank-level values of the given sites. */
  async headlineChannels(siteIds: string[]): Promise<FleetChannelRow[]> {
    if (!siteIds.length) return [];
    const { rows } = await sql<FleetChannelRow>`
      select c.site_id, c.id, c.name, c.unit, c.last_time, c.last_value
        from channels c
       where c.site_id = any(${siteIds}::uuid[])
         and (c.name in ('battery/voltage', 'battery/temperature') or c.name like 'tank/%/level')`.execute(
      this.db,
    );
    return rows;
  }

  async storageTanks(siteIds: string[]): Promise<FleetTankRow[]> {
    if (!siteIds.length) return [];
    const { rows } = await sql<FleetTankRow>`
      select t.site_id, t.key, t.geometry as shape, t.diameter_m as "diameterMetres",
             t.length_m as "lengthMetres", t.width_m as "widthMetres",
             t.height_m as "heightMetres", t.sensor_offset_m
        from tanks t
       where t.site_id = any(${siteIds}::uuid[])
         and t.kind = 'storage' and t.geometry is not null
       order by t.site_id, t.key`.execute(this.db);
    return rows;
  }

  /**
   * Hourly means of the given channels since `from` (the mini-series), one row per channel
   * with the means as a JSON object keyed by epoch milliseconds (JSON parses natively, which
   * is much cheaper than a row per hour).
   */
  async hourlyMeans(
    channels: { siteId: string; channelId: number }[],
    from: Date,
  ): Promise<{ channel_id: number; means: Record<string, number> }[]> {
    if (!channels.length) return [];
    const { rows } = await sql<{ channel_id: number; means: Record<string, number> }>`
      select h.channel_id,
             json_object_agg((extract(epoch from h.bucket_start) * 1000)::bigint, h.sum / h.sample_count) as means
        from unnest(${channels.map((c) => c.siteId)}::uuid[], ${channels.map((c) => c.channelId)}::int[])
             as k(site_id, channel_id)
        join hour_buckets h on h.site_id = k.site_id and h.channel_id = k.channel_id
                           and h.bucket_start >= ${from}
       group by h.channel_id`.execute(this.db);
    return rows;
  }

  /**
   * Average level drop per day over the last 7 days for tank-level channels: the sum of falls
   * inside each hour bucket (first minus last when positive) divided by the days covered.
   * A pump filling during an hour of use hides that hour's use, so this slightly undercounts.
   */
  async levelDropPerDay(
    channels: { siteId: string; channelId: number }[],
    since: Date,
  ): Promise<{ site_id: string; channel_id: number; drop_m_per_day: number }[]> {
    if (!channels.length) return [];
    const { rows } = await sql<{ site_id: string; channel_id: number; drop_m_per_day: number }>`
      select h.site_id, h.channel_id,
             sum(greatest(h.first_value - h.last_value, 0))
               / greatest(extract(epoch from (max(h.bucket_start) - min(h.bucket_start))) / 86400 + 1 / 24.0, 1)
               as drop_m_per_day
        from unnest(${channels.map((c) => c.siteId)}::uuid[], ${channels.map((c) => c.channelId)}::int[])
             as k(site_id, channel_id)
        join hour_buckets h on h.site_id = k.site_id and h.channel_id = k.channel_id
                           and h.bucket_start >= ${since}
       group by h.site_id, h.channel_id`.execute(this.db);
    return rows;
  }
}

/** A site is silent after this many reporting intervals without data, and at least 10 minutes. */
export const SILENT_AFTER_INTERVALS = 10;
export const SILENT_AFTER_MIN_S = 600;

function ownerFilter(user: SessionUser) {
  return user.role === 'owner'
    ? sql`and exists (select 1 from owner_sites os where os.site_id = s.id and os.user_id = ${user.id})`
    : sql``;
}
