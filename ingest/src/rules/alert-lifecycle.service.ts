import { Inject, Injectable } from '@nestjs/common';
import type { RuleDecision } from '@wellkept/core';
import type { Logger } from 'pino';
import { LOGGER } from '../logging/logger.js';
import { AlertNotifier } from '../notifications/alert-notifier.service.js';
import { SiteUpdates, type SiteUpdatedEvent } from '../site-updates/site-updates.js';
import { AlertsRepository, type AlertChange } from './alerts.repository.js';
import { RULES_CONFIG, type RulesConfig } from './rules-config.js';

/**
 * Turns rule decisions into alert changes: open (or reopen), escalate, clear. Runs in one
 * transaction per site under the site's lock, re-reading the open alerts there (a person may
 * have cleared one since the rules looked), writes the history, and announces the change on
 * `site_updates` with `what: ["alerts"]`. Mail follows from the history (AlertNotifier).
 */
@Injectable()
export class AlertLifecycleService {
  constructor(
    private readonly alerts: AlertsRepository,
    private readonly siteUpdates: SiteUpdates,
    private readonly notifier: AlertNotifier,
    @Inject(RULES_CONFIG) private readonly config: RulesConfig,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {}

  async apply(
    siteId: string,
    decisions: readonly RuleDecision[],
    at: Date,
  ): Promise<AlertChange[]> {
    const actionable = decisions.filter((d) => d.action !== 'none');
    if (actionable.length === 0) return [];
    const { changes, touched } = await this.alerts.database.transaction().execute(async (trx) => {
      await this.alerts.lockSite(trx, siteId);
      const active = await this.alerts.active(trx, siteId);
      const find = (d: RuleDecision) =>
        active.find((a) => a.kind === d.kind && a.subject === d.subject) ?? null;
      const changes: AlertChange[] = [];
      let touched = false;
      for (const d of actionable) {
        const current = find(d);
        if (d.action === 'open' && !current) {
          changes.push(
            await this.alerts.open(trx, {
              siteId,
              kind: d.kind,
              subject: d.subject,
              severity: d.severity ?? 'watch',
              summary: d.summary,
              evidence: d.evidence,
              at,
              reopenWithinSeconds: this.config.reopenWithinSeconds,
            }),
          );
        } else if ((d.action === 'open' || d.action === 'keep') && current && d.severity) {
          if (d.severity !== current.severity) {
            await this.alerts.escalate(trx, current.id, d.severity, d.summary, d.evidence, at);
            touched = true;
          }
        } else if (d.action === 'clear' && current) {
          changes.push(
            await this.alerts.clearByRule(trx, current, siteId, d.summary, d.evidence, at),
          );
        }
        // 'keep' with nothing open: a person cleared it meanwhile; the next evaluation decides.
      }
      const update: SiteUpdatedEvent[] =
        changes.length > 0 || touched ? [{ siteId, what: ['alerts'], at: at.toISOString() }] : [];
      await this.siteUpdates.notifyInTransaction(trx, update);
      return { changes, touched };
    });
    if (changes.length === 0 && !touched) return [];
    this.siteUpdates.emit([{ siteId, what: ['alerts'], at: at.toISOString() }]);
    for (const c of changes) {
      this.logger.info(
        { siteId, kind: c.kind, subject: c.subject, event: c.event, alertId: c.alertId },
        'alert changed',
      );
    }
    // Mail for the new history rows; a failure here is retried by the notifier's own sweep.
    if (changes.length > 0) await this.notifier.sweep().catch(() => undefined);
    return changes;
  }
}
