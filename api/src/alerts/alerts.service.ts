import { Injectable } from '@nestjs/common';
import { defaultRuleParams } from '@wellkept/core';
import type { Database, Json } from '@wellkept/db';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { ALERT_KINDS, type AlertKind } from '../account/dto/account.dto.js';
import { AuditRepository } from '../audit/audit.repository.js';
import { badRequest, conflict, notFound } from '../common/api-error.js';
import { InjectDb } from '../database/database.module.js';
import type { AlertsQuery } from './dto/alerts.dto.js';
import { AlertsRepository } from './alerts.repository.js';

type AlertRow = Awaited<ReturnType<AlertsRepository['list']>>[number];

@Injectable()
export class AlertsService {
  constructor(
    @InjectDb() private readonly db: Database,
    private readonly alerts: AlertsRepository,
    private readonly audit: AuditRepository,
  ) {}

  async list(user: SessionUser, query: AlertsQuery, site?: VisibleSite) {
    return (await this.alerts.list(user, query, site)).map(toAlertDto);
  }

  async get(site: VisibleSite, alertId: string) {
    const alert = await this.alerts.find(site, alertId);
    if (!alert) throw notFound('Alert');
    const events = await this.alerts.events(site, alertId);
    return {
      ...toAlertDto(alert),
      history: events.map((e) => ({
        id: e.id,
        event: e.event,
        at: e.at,
        userName: e.user_name,
        note: e.note,
      })),
    };
  }

  async acknowledge(user: SessionUser, site: VisibleSite, alertId: string, note: string) {
    const result = await this.alerts.acknowledge(site, alertId, user.id, note);
    if (result === 'missing') throw notFound('Alert');
    if (result === 'not_open') throw conflict('not_open', 'Only an open alert can be acknowledged');
    return this.get(site, alertId);
  }

  // Thresholds -------------------------------------------------------------------------

  async settings(site: VisibleSite) {
    const [battery, rows] = await Promise.all([
      this.db
        .selectFrom('battery_banks')
        .select(['chemistry', 'nominal_voltage_v', 'capacity_ah'])
        .where('site_id', '=', site.id)
        .executeTakeFirst(),
      this.db.selectFrom('alert_settings').selectAll().where('site_id', '=', site.id).execute(),
    ]);
    const defaults = defaultRuleParams({
      battery: battery
        ? {
            chemistry: battery.chemistry,
            nominalVolts: battery.nominal_voltage_v,
            capacityAmpHours: battery.capacity_ah,
          }
        : null,
    }) as unknown as Record<AlertKind, Record<string, number>>;
    const byKind = new Map(rows.map((r) => [r.kind, r]));
    return ALERT_KINDS.map((kind) => {
      const row = byKind.get(kind);
      const params = (row?.params ?? {}) as Record<string, number>;
      return {
        kind,
        enabled: row?.enabled ?? true,
        params,
        defaults: defaults[kind],
        effective: { ...defaults[kind], ...params },
        updatedAt: row?.updated_at ?? null,
      };
    });
  }

  async putSetting(
    user: SessionUser,
    site: VisibleSite,
    kind: AlertKind,
    body: { enabled: boolean; params: Record<string, number> },
  ) {
    const known = Object.keys(defaultRuleParams({ battery: null })[kind]);
    const unknown = Object.keys(body.params).filter((k) => !known.includes(k));
    if (unknown.length) {
      throw badRequest(
        'validation_failed',
        `${kind} has no threshold named ${unknown.join(', ')} (known: ${known.join(', ')})`,
        unknown.map((k) => ({ path: `params.${k}`, message: 'is not a threshold of this alert' })),
      );
    }
    await this.db.transaction().execute(async (trx) => {
      const values = {
        enabled: body.enabled,
        params: JSON.stringify(body.params) as unknown as Json,
        updated_at: new Date(),
        updated_by: user.id,
      };
      await trx
        .insertInto('alert_settings')
        .values({ site_id: site.id, kind, ...values })
        .onConflict((oc) => oc.columns(['site_id', 'kind']).doUpdateSet(values))
        .execute();
      await this.audit.record(
        {
          companyId: user.companyId,
          userId: user.id,
          action: 'alert_thresholds_changed',
          targetType: 'site',
          targetId: site.id,
          details: { kind, enabled: body.enabled, params: body.params },
        },
        trx,
      );
    });
    return (await this.settings(site)).find((s) => s.kind === kind)!;
  }
}

function toAlertDto(a: AlertRow) {
  return {
    id: a.id,
    siteId: a.site_id,
    siteName: a.site_name,
    kind: a.kind,
    subject: a.subject,
    severity: a.severity,
    status: a.status,
    summary: a.summary,
    evidence: a.evidence,
    openedAt: a.opened_at,
    acknowledgedAt: a.acknowledged_at,
    acknowledgedBy: a.acknowledged_by_name,
    acknowledgeNote: a.acknowledge_note,
    clearedAt: a.cleared_at,
  };
}
