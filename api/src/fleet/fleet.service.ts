import { Injectable } from '@nestjs/common';
import {
  daysOfWaterLeft,
  estimateStateOfCharge,
  tankCapacityCubicMetres,
  tankHeightMetres,
  tankGeometryFrom,
  tankVolumeFromLevel,
} from '@wellkept/core';
import type { SessionUser } from '../access/session-user.js';
import { HEALTH, type FleetResponse, type FleetSite, type Health } from './dto/fleet.dto.js';
import {
  type FleetChannelRow,
  FleetRepository,
  type FleetSiteRow,
  type FleetTankRow,
} from './fleet.repository.js';

const HOUR_MS = 3600_000;
/** Water use moves slowly; each process recomputes a tank's 7-day average every 10 minutes. */
const USE_CACHE_MS = 10 * 60_000;
/**
 * A large fleet's overview is shared for this long between callers who see the same sites and
 * ask for the same page (one company's admins and technicians; each owner alone). Ranking
 * thousands of sites costs PostgreSQL about a third of a second; fifty people with the board
 * open would otherwise keep both cores of a small server busy and starve ingest (the
 * 10,000-gateway load run showed PUBACKs stalling). Live updates still arrive by the event
 * stream; a refetch sees data at most this old.
 */
const SHARED_MS = 1000;
/** Fleets smaller than this are computed for every request (cheap, and always current). */
const SHARED_FROM_SITES = 500;

@Injectable()
export class FleetService {
  private readonly useCache = new Map<number, { dropPerDay: number | null; at: number }>();
  /** Overviews in progress or recently made, by scope and page (see SHARED_MS). */
  private readonly shared = new Map<string, { answer: Promise<FleetResponse>; at: number }>();
  /** Scopes whose last overview counted SHARED_FROM_SITES sites or more. */
  private readonly largeScopes = new Set<string>();

  constructor(private readonly fleet: FleetRepository) {}

  /**
   * The overview for the caller. For a large fleet (as its last answer showed), identical
   * requests share one computation, and its answer is reused for SHARED_MS.
   */
  overview(user: SessionUser, page: { limit: number; offset: number }): Promise<FleetResponse> {
    const scope = user.role === 'owner' ? `owner:${user.id}` : `company:${user.companyId}`;
    const now = Date.now();
    if (!this.largeScopes.has(scope)) return this.computeAndNote(scope, user, page, now);
    const key = `${scope}|${page.limit}|${page.offset}`;
    const hit = this.shared.get(key);
    if (hit && now - hit.at < SHARED_MS) return hit.answer;
    for (const [k, v] of this.shared) if (now - v.at >= SHARED_MS) this.shared.delete(k);
    const answer = this.computeAndNote(scope, user, page, now);
    this.shared.set(key, { answer, at: now });
    answer.catch(() => {
      if (this.shared.get(key)?.answer === answer) this.shared.delete(key);
    });
    return answer;
  }

  private async computeAndNote(
    scope: string,
    user: SessionUser,
    page: { limit: number; offset: number },
    now: number,
  ): Promise<FleetResponse> {
    const answer = await this.compute(user, page, new Date(now));
    if (answer.page.total >= SHARED_FROM_SITES) this.largeScopes.add(scope);
    else this.largeScopes.delete(scope);
    return answer;
  }

  private async compute(
    user: SessionUser,
    page: { limit: number; offset: number },
    now: Date,
  ): Promise<FleetResponse> {
    const sparkStart = Math.floor(now.getTime() / HOUR_MS) * HOUR_MS - 23 * HOUR_MS;
    const { rows: sites, counts: rankCounts } = await this.fleet.sites(user, page);
    const ids = sites.map((s) => s.id);
    const [channels, tanks] = await Promise.all([
      this.fleet.headlineChannels(ids),
      this.fleet.storageTanks(ids),
    ]);
    const channelsBySite = groupBy(channels, (c) => c.site_id);
    const tanksBySite = groupBy(tanks, (t) => t.site_id);

    // The first storage tank with a level channel is the site's headline tank.
    const headlineTank = new Map<string, { tank: FleetTankRow; channel: FleetChannelRow }>();
    for (const [siteId, list] of tanksBySite) {
      const siteChannels = channelsBySite.get(siteId) ?? [];
      for (const tank of list) {
        const channel = siteChannels.find((c) => c.name === `tank/${tank.key}/level`);
        if (channel) {
          headlineTank.set(siteId, { tank, channel });
          break;
        }
      }
    }
    const sparkChannel = new Map<string, FleetChannelRow>();
    for (const s of sites) {
      const list = channelsBySite.get(s.id) ?? [];
      const voltage = s.chemistry ? list.find((c) => c.name === 'battery/voltage') : undefined;
      const pick = voltage ?? headlineTank.get(s.id)?.channel;
      if (pick) sparkChannel.set(s.id, pick);
    }
    const [hourly, dropPerDay] = await Promise.all([
      this.fleet.hourlyMeans(
        [...sparkChannel].map(([siteId, c]) => ({ siteId, channelId: c.id })),
        new Date(sparkStart),
      ),
      this.levelDrops(
        [...headlineTank].map(([siteId, h]) => ({ siteId, channelId: h.channel.id })),
        now,
      ),
    ]);
    const sparks = new Map<number, (number | null)[]>();
    for (const row of hourly) {
      const values = new Array<number | null>(24).fill(null);
      for (const [t, mean] of Object.entries(row.means)) {
        const slot = Math.round((Number(t) - sparkStart) / HOUR_MS);
        if (slot >= 0 && slot <= 23) values[slot] = mean;
      }
      sparks.set(row.channel_id, values);
    }

    const result: FleetSite[] = sites.map((s) => {
      const list = channelsBySite.get(s.id) ?? [];
      const spark = sparkChannel.get(s.id);
      const tank = headlineTank.get(s.id);
      const health = HEALTH[s.rank] ?? 'silent';
      const healthReason = this.healthReason(health, s);
      return {
        id: s.id,
        name: s.name,
        locality: s.locality,
        health,
        healthReason,
        lastSeenAt: s.last_seen_at,
        openAlerts: { count: s.open_alerts, kinds: s.alert_kinds ?? [] },
        battery: this.battery(s, list, now),
        water: tank
          ? this.water(tank.tank, tank.channel, dropPerDay.get(tank.channel.id) ?? null)
          : null,
        spark: spark
          ? {
              measurement: spark.name,
              unit: spark.unit,
              values: sparks.get(spark.id) ?? new Array<null>(24).fill(null),
            }
          : null,
      };
    });
    const counts = { act: 0, silent: 0, watch: 0, steady: 0 };
    for (const c of rankCounts) counts[HEALTH[c.rank] ?? 'silent'] += c.n;
    const total = counts.act + counts.silent + counts.watch + counts.steady;
    return { generatedAt: now, sparkStart, counts, page: { ...page, total }, sites: result };
  }

  /** Words for the health state the query ranked (same rules, see FleetRepository.sites). */
  private healthReason(health: Health, s: FleetSiteRow): string {
    const plural = (n: number) => (n > 1 ? 's' : '');
    switch (health) {
      case 'act':
        return `${s.act_alerts} alert${plural(s.act_alerts)} need${s.act_alerts > 1 ? '' : 's'} action`;
      case 'silent':
        if (s.gateway_count === 0) return 'no gateway is set up';
        return s.last_seen_at ? 'no recent data' : 'no data received yet';
      case 'watch':
        return `${s.open_alerts} alert${plural(s.open_alerts)} open`;
      default:
        return 'nothing open';
    }
  }

  private battery(s: FleetSiteRow, channels: FleetChannelRow[], now: Date): FleetSite['battery'] {
    if (!s.chemistry || !s.nominal_voltage_v || !s.capacity_ah) return null;
    const voltage = channels.find((c) => c.name === 'battery/voltage');
    const temperature = channels.find((c) => c.name === 'battery/temperature');
    const volts = voltage?.last_value ?? null;
    const at = voltage?.last_time ?? null;
    const estimate = estimateStateOfCharge({
      bank: {
        chemistry: s.chemistry,
        nominalVolts: s.nominal_voltage_v,
        capacityAmpHours: s.capacity_ah,
      },
      voltages: volts !== null && at ? [{ t: at.getTime() / 1000, v: volts }] : [],
      ...(temperature?.last_value != null ? { temperatureCelsius: temperature.last_value } : {}),
      atT: now.getTime() / 1000,
    });
    return {
      stateOfChargePercent:
        estimate.socFraction === null ? null : round1(estimate.socFraction * 100),
      lowPercent: round1(estimate.lowFraction * 100),
      highPercent: round1(estimate.highFraction * 100),
      confidence: estimate.confidence,
      volts,
      at,
    };
  }

  private water(
    tank: FleetTankRow,
    channel: FleetChannelRow,
    dropPerDay: number | null,
  ): FleetSite['water'] {
    const geometry = tankGeometryFrom(tank);
    if (!geometry || channel.last_value === null) return null;
    const volume = tankVolumeFromLevel(
      { key: tank.key, geometry, sensorOffsetMetres: tank.sensor_offset_m },
      channel.last_value,
    );
    if (!volume.ok) return null;
    // Level drop to volume through the mean cross-section (exact for upright and box tanks).
    const area = tankCapacityCubicMetres(geometry) / tankHeightMetres(geometry);
    const usePerDay = dropPerDay === null ? NaN : dropPerDay * area;
    const days = daysOfWaterLeft(volume.cubicMetres, usePerDay);
    return {
      storedM3: round3(volume.cubicMetres),
      capacityM3: round3(volume.capacityCubicMetres),
      percent: round1(volume.fractionFull * 100),
      daysLeft: days === null ? null : round1(days),
      at: channel.last_time,
    };
  }

  /** 7-day average level drop per day, per channel, cached per process for a few minutes. */
  private async levelDrops(channels: { siteId: string; channelId: number }[], now: Date) {
    const fresh = now.getTime() - USE_CACHE_MS;
    const missing = channels.filter((c) => (this.useCache.get(c.channelId)?.at ?? 0) < fresh);
    if (missing.length) {
      const rows = await this.fleet.levelDropPerDay(
        missing,
        new Date(now.getTime() - 7 * 24 * HOUR_MS),
      );
      const found = new Map(rows.map((r) => [r.channel_id, r.drop_m_per_day]));
      for (const c of missing) {
        this.useCache.set(c.channelId, {
          dropPerDay: found.get(c.channelId) ?? null,
          at: now.getTime(),
        });
      }
    }
    return new Map(
      channels.map((c) => [c.channelId, this.useCache.get(c.channelId)?.dropPerDay ?? null]),
    );
  }
}

function groupBy<T>(items: T[], key: (item: T) => string): Map<string, T[]> {
  const map = new Map<string, T[]>();
  for (const item of items) {
    const k = key(item);
    const list = map.get(k);
    if (list) list.push(item);
    else map.set(k, [item]);
  }
  return map;
}

const round1 = (x: number) => Math.round(x * 10) / 10;
const round3 = (x: number) => Math.round(x * 1000) / 1000;
