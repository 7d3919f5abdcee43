import { Inject, Injectable } from '@nestjs/common';
import {
  tankGeometryFrom,
  type AlertKind,
  type RuleParamsOverrides,
  type SiteConfig,
} from '@wellkept/core';
import { sql } from 'kysely';
import { jsonArrayFrom } from 'kysely/helpers/postgres';
import { DATABASE, type Database } from '../database/database.js';
import { TANK_DIMENSION_COLUMNS } from '../database/tank-dimensions.js';

/** What the rules need to know of a site besides its data. */
export interface SiteForRules {
  id: string;
  companyId: string;
  name: string;
  config: SiteConfig;
  /** Per-site threshold overrides (`alert_settings.params`, by kind). */
  overrides: RuleParamsOverrides;
  /** Kinds switched off for the site (`alert_settings.enabled = false`). */
  disabled: ReadonlySet<AlertKind>;
  /** Equipment id (pump, tank, float) by key, for links and wording. */
  equipmentNames: ReadonlyMap<string, string>;
}

/**
 * Loads a site's equipment and alert settings into core's `SiteConfig` (SI units, equipment by
 * key). One query for one or many sites.
 */
@Injectable()
export class SiteConfigRepository {
  constructor(@Inject(DATABASE) private readonly db: Database) {}

  /** Ids of the sites that have at least one gateway that is not revoked. */
  async watchedSiteIds(): Promise<string[]> {
    const rows = await this.db
      .selectFrom('gateways')
      .select('site_id')
      .distinct()
      .where('revoked_at', 'is', null)
      .execute();
    return rows.map((r) => r.site_id);
  }

  async load(siteIds: readonly string[]): Promise<Map<string, SiteForRules>> {
    const out = new Map<string, SiteForRules>();
    if (siteIds.length === 0) return out;
    // One round trip: each site with its equipment and settings as JSON arrays. Evaluations run
    // one site at a time as data arrives, and eight queries each (one per table) held eight pool
    // connections per evaluation while thousands of gateways first reported at once. JSON turns
    // timestamps into text, so the one timestamp the rules use comes as epoch seconds.
    const sites = await this.db
      .selectFrom('sites as s')
      .select((eb) => [
        's.id',
        's.company_id',
        's.name',
        's.time_zone',
        's.latitude',
        's.longitude',
        's.elevation_m',
        's.reporting_interval_s',
        jsonArrayFrom(
          eb
            .selectFrom('battery_banks as b')
            .select(['b.chemistry', 'b.nominal_voltage_v', 'b.capacity_ah'])
            .whereRef('b.site_id', '=', 's.id')
            .orderBy('b.created_at'),
        ).as('banks'),
        jsonArrayFrom(
          eb
            .selectFrom('tanks as t')
            .select([
              't.id',
              't.key',
              't.name',
              't.kind',
              ...TANK_DIMENSION_COLUMNS,
              't.sensor_offset_m',
            ])
            .whereRef('t.site_id', '=', 's.id'),
        ).as('tanks'),
        jsonArrayFrom(
          eb
            .selectFrom('pumps as p')
            .select([
              'p.id',
              'p.key',
              'p.name',
              'p.kind',
              'p.rated_current_a',
              'p.rated_flow_m3s',
              'p.motor_power_w',
              'p.fills_tank_id',
              sql<number | null>`extract(epoch from p.last_rebuild_at)::float8`.as(
                'last_rebuild_t',
              ),
              'p.rebuild_interval_h',
              'p.supply',
            ])
            .whereRef('p.site_id', '=', 's.id'),
        ).as('pumps'),
        jsonArrayFrom(
          eb
            .selectFrom('pv_arrays as a')
            .select(['a.key', 'a.purpose', 'a.rated_w', 'a.tilt_deg', 'a.azimuth_deg', 'a.pump_id'])
            .whereRef('a.site_id', '=', 's.id'),
        ).as('arrays'),
        jsonArrayFrom(
          eb
            .selectFrom('float_switches as f')
            .select(['f.key', 'f.name', 'f.tank_id', 'f.pump_id'])
            .whereRef('f.site_id', '=', 's.id'),
        ).as('floats'),
        jsonArrayFrom(
          eb
            .selectFrom('gateways as g')
            .select('g.id')
            .whereRef('g.site_id', '=', 's.id')
            .where('g.revoked_at', 'is', null),
        ).as('gateways'),
        jsonArrayFrom(
          eb
            .selectFrom('alert_settings as k')
            .select(['k.kind', 'k.enabled', 'k.params'])
            .whereRef('k.site_id', '=', 's.id'),
        ).as('settings'),
      ])
      .where('s.id', 'in', [...siteIds])
      .execute();

    for (const [i, site] of sites.entries()) {
      // A tick loads every watched site: let socket reads and commits run between slices.
      if (i % 500 === 499) await new Promise((resolve) => setImmediate(resolve));
      const { banks, tanks, pumps, arrays: siteArrays, floats, settings: siteSettings } = site;
      const bank = banks[0];
      const tankKey = new Map(tanks.map((t) => [t.id, t.key]));
      const pumpKey = new Map(pumps.map((p) => [p.id, p.key]));
      const overrides: Record<string, unknown> = {};
      for (const s of siteSettings) overrides[s.kind] = s.params;
      const names = new Map<string, string>();
      const config: SiteConfig = {
        timeZone: site.time_zone,
        location: {
          latitudeDegrees: site.latitude,
          longitudeDegrees: site.longitude,
          elevationMetres: site.elevation_m,
        },
        battery: bank
          ? {
              chemistry: bank.chemistry,
              nominalVolts: bank.nominal_voltage_v,
              capacityAmpHours: bank.capacity_ah,
            }
          : null,
        // Only arrays that charge the bank count for "not charging"; pump-direct arrays are
        // judged through their pump.
        pvArrays: siteArrays
          .filter((a) => a.purpose === 'battery_charging')
          .map((a) => ({
            key: a.key,
            ratedWatts: a.rated_w,
            tiltDegrees: a.tilt_deg,
            azimuthDegrees: a.azimuth_deg,
          })),
        pumps: pumps.map((p) => {
          names.set(`pump:${p.key}`, p.name);
          return {
            key: p.key,
            role: p.kind,
            ratedCurrentAmps: p.rated_current_a,
            ratedFlowCubicMetresPerSecond: p.rated_flow_m3s,
            ratedWatts: p.motor_power_w,
            fillsTankKey: p.fills_tank_id ? (tankKey.get(p.fills_tank_id) ?? null) : null,
            lastRebuildT: p.last_rebuild_t,
            rebuildIntervalHours: p.rebuild_interval_h,
            supply: p.supply,
            // Battery-run motors see the bank's voltage (for run energy without a voltage channel).
            supplyVolts: p.supply === 'battery' && bank ? bank.nominal_voltage_v : null,
            pvArrayKey: siteArrays.find((a) => a.pump_id === p.id)?.key ?? null,
          };
        }),
        tanks: tanks
          .filter((t) => t.kind === 'storage')
          .flatMap((t) => {
            const geometry = tankGeometryFrom(t);
            if (!geometry) return [];
            names.set(`tank:${t.key}`, t.name);
            return [{ key: t.key, geometry, sensorOffsetMetres: t.sensor_offset_m }];
          }),
        floatSwitches: floats.map((f) => {
          names.set(`float:${f.key}`, f.name);
          return {
            key: f.key,
            tankKey: tankKey.get(f.tank_id) ?? '',
            pumpKey: f.pump_id ? (pumpKey.get(f.pump_id) ?? null) : null,
            // Both wirings the schema knows ('closes_on_low', 'opens_on_high') describe a
            // pump-up float whose contacts are closed while it calls for water.
            logic: 'closed_calls' as const,
          };
        }),
        gateways: site.gateways.map((g) => ({
          id: g.id,
          reportingIntervalSeconds: site.reporting_interval_s,
        })),
      };
      out.set(site.id, {
        id: site.id,
        companyId: site.company_id,
        name: site.name,
        config,
        overrides: overrides as RuleParamsOverrides,
        disabled: new Set(siteSettings.filter((s) => !s.enabled).map((s) => s.kind)),
        equipmentNames: names,
      });
    }
    return out;
  }
}
