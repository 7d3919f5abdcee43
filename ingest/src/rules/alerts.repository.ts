import { Inject, Injectable } from '@nestjs/common';
import type { AlertKind, AlertSeverity, Evidence, OpenAlert } from '@wellkept/core';
import type { Json } from '@wellkept/db';
import { sql } from 'kysely';
import { DATABASE, type Database } from '../database/database.js';

/** An alert that is open or acknowledged (not cleared). */
export interface ActiveAlert {
  id: string;
  kind: AlertKind;
  subject: string;
  severity: AlertSeverity;
  status: 'open' | 'acknowledged';
  openedAt: Date;
}

/** An alert row written by the rules, with the history event it produced. */
export interface AlertChange {
  alertId: string;
  eventId: number;
  event: 'opened' | 'reopened' | 'cleared';
  kind: AlertKind;
  subject: string;
}

export interface OpenRequest {
  siteId: string;
  kind: AlertKind;
  subject: string;
  severity: AlertSeverity;
  summary: string;
  evidence: Evidence | null;
  at: Date;
  /** A cleared alert of the same kind and subject cleared this recently is reopened instead. */
  reopenWithinSeconds: number;
}

/**
 * The alert aggregate: `alerts` (one open or acknowledged row per site, kind and subject, held by
 * the `alerts_one_open_idx` unique index) and its history in `alert_events`. Every write runs in
 * the caller's transaction, after {@link lockSite}, so evaluations of one site never interleave
 * (across ingest nodes too) and each change and its event commit together.
 */
@Injectable()
export class AlertsRepository {
  constructor(@Inject(DATABASE) readonly database: Database) {}

  /** Serialises alert writes for one site until the transaction ends. */
  async lockSite(trx: Database, siteId: string): Promise<void> {
    await sql`select pg_advisory_xact_lock(hashtextextended(${`alerts:${siteId}`}, 0))`.execute(
      trx,
    );
  }

  /** Sites with an alert of this kind not yet cleared. */
  async sitesWithActive(kind: AlertKind): Promise<Set<string>> {
    const rows = await this.database
      .selectFrom('alerts')
      .select('site_id')
      .distinct()
      .where('kind', '=', kind)
      .where('status', '<>', 'cleared')
      .execute();
    return new Set(rows.map((r) => r.site_id));
  }

  async active(db: Database, siteId: string): Promise<ActiveAlert[]> {
    const rows = await db
      .selectFrom('alerts')
      .select(['id', 'kind', 'subject', 'severity', 'status', 'opened_at'])
      .where('site_id', '=', siteId)
      .where('status', '<>', 'cleared')
      .execute();
    return rows.map((r) => ({
      id: r.id,
      kind: r.kind,
      subject: r.subject,
      severity: r.severity,
      status: r.status as ActiveAlert['status'],
      openedAt: r.opened_at,
    }));
  }

  /** The open alerts as core's evaluators take them. */
  static asOpenAlerts(alerts: readonly ActiveAlert[]): OpenAlert[] {
    return alerts.map((a) => ({
      kind: a.kind,
      subject: a.subject,
      severity: a.severity,
      openedT: a.openedAt.getTime() / 1000,
    }));
  }

  /**
   * Opens an alert, or reopens the same kind and subject when it was cleared within the reopen
   * window (so a fault that comes back keeps one history).
   */
  async open(trx: Database, r: OpenRequest): Promise<AlertChange> {
    const evidence = (r.evidence ?? {}) as unknown as Json;
    const since = new Date(r.at.getTime() - r.reopenWithinSeconds * 1000);
    const recent = await trx
      .selectFrom('alerts')
      .select('id')
      .where('site_id', '=', r.siteId)
      .where('kind', '=', r.kind)
      .where('subject', '=', r.subject)
      .where('status', '=', 'cleared')
      .where('cleared_at', '>=', since)
      .orderBy('cleared_at', 'desc')
      .limit(1)
      .executeTakeFirst();
    let alertId: string;
    let event: 'opened' | 'reopened';
    if (recent) {
      await trx
        .updateTable('alerts')
        .set({
          status: 'open',
          severity: r.severity,
          summary: r.summary,
          evidence,
          acknowledged_at: null,
          acknowledged_by: null,
          acknowledge_note: null,
          cleared_at: null,
          cleared_by: null,
          clear_note: null,
          reopened_count: sql<number>`reopened_count + 1`,
          updated_at: r.at,
        })
        .where('id', '=', recent.id)
        .execute();
      alertId = recent.id;
      event = 'reopened';
    } else {
      const inserted = await trx
        .insertInto('alerts')
        .values({
          site_id: r.siteId,
          kind: r.kind,
          subject: r.subject,
          severity: r.severity,
          status: 'open',
          summary: r.summary,
          evidence,
          opened_at: r.at,
          updated_at: r.at,
        })
        .returning('id')
        .executeTakeFirstOrThrow();
      alertId = inserted.id;
      event = 'opened';
    }
    const eventId = await this.addEvent(trx, alertId, r.siteId, event, r.at, null, evidence);
    return { alertId, eventId, event, kind: r.kind, subject: r.subject };
  }

  /** A new severity (and the summary and evidence that go with it) for an alert still open. */
  async escalate(
    trx: Database,
    alertId: string,
    severity: AlertSeverity,
    summary: string,
    evidence: Evidence | null,
    at: Date,
  ): Promise<void> {
    await trx
      .updateTable('alerts')
      .set({
        severity,
        summary,
        ...(evidence ? { evidence: evidence as unknown as Json } : {}),
        updated_at: at,
      })
      .where('id', '=', alertId)
      .where('status', '<>', 'cleared')
      .execute();
  }

  /** Clears an alert because its rule recovered past the hysteresis band. */
  async clearByRule(
    trx: Database,
    alert: ActiveAlert,
    siteId: string,
    summary: string,
    evidence: Evidence | null,
    at: Date,
  ): Promise<AlertChange> {
    await trx
      .updateTable('alerts')
      .set({
        status: 'cleared',
        cleared_at: at,
        cleared_by: null,
        clear_note: summary,
        updated_at: at,
      })
      .where('id', '=', alert.id)
      .execute();
    const eventId = await this.addEvent(
      trx,
      alert.id,
      siteId,
      'cleared',
      at,
      summary,
      (evidence ?? null) as unknown as Json,
    );
    return {
      alertId: alert.id,
      eventId,
      event: 'cleared',
      kind: alert.kind,
      subject: alert.subject,
    };
  }

  /** Whether any event of a kind was written for the site at or after an instant. */
  async anyEventSince(siteId: string, kind: AlertKind, since: Date): Promise<boolean> {
    const row = await this.database
      .selectFrom('alert_events as e')
      .innerJoin('alerts as a', 'a.id', 'e.alert_id')
      .select('e.id')
      .where('e.site_id', '=', siteId)
      .where('a.kind', '=', kind)
      .where('e.at', '>=', since)
      .limit(1)
      .executeTakeFirst();
    return row !== undefined;
  }

  private async addEvent(
    trx: Database,
    alertId: string,
    siteId: string,
    event: 'opened' | 'reopened' | 'cleared',
    at: Date,
    note: string | null,
    evidence: Json | null,
  ): Promise<number> {
    const row = await trx
      .insertInto('alert_events')
      .values({ alert_id: alertId, site_id: siteId, event, at, note, evidence })
      .returning('id')
      .executeTakeFirstOrThrow();
    return row.id;
  }
}
