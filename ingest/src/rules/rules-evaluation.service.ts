import { Inject, Injectable } from '@nestjs/common';
import {
  RULE_EVALUATORS,
  type AlertKind,
  type RuleDecision,
  type RuleInput,
  type SeriesMap,
} from '@wellkept/core';
import type { Logger } from 'pino';
import { LOGGER } from '../logging/logger.js';
import { CLOCK, type Clock } from '../notifications/clock.js';
import { AlertLifecycleService } from './alert-lifecycle.service.js';
import { AlertsRepository, type AlertChange } from './alerts.repository.js';
import { RuleDataRepository } from './rule-data.repository.js';
import { SiteConfigRepository } from './site-config.repository.js';

/** Kinds judged from the data as it arrives (and on the periodic full evaluation). */
export const DATA_KINDS: readonly AlertKind[] = [
  'low_charge',
  'float_stuck',
  'dry_run',
  'short_cycling',
  'gateway_silent',
  'water_low',
  'no_charge',
];

export interface EvaluationResult {
  siteId: string;
  at: Date;
  decisions: RuleDecision[];
  changes: AlertChange[];
}

/**
 * One evaluation of one site: loads its equipment, settings, open alerts and (when a kind needs
 * them) its recent samples, runs core's evaluators for the kinds asked, and hands the decisions
 * to the alert lifecycle. An evaluator that throws is logged and skipped; the others still run.
 */
@Injectable()
export class RulesEvaluationService {
  constructor(
    private readonly sites: SiteConfigRepository,
    private readonly data: RuleDataRepository,
    private readonly alerts: AlertsRepository,
    private readonly lifecycle: AlertLifecycleService,
    @Inject(CLOCK) private readonly clock: Clock,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {}

  async evaluate(siteId: string, kinds: readonly AlertKind[]): Promise<EvaluationResult> {
    const at = this.clock.now();
    const nowT = at.getTime() / 1000;
    const site = (await this.sites.load([siteId])).get(siteId);
    if (!site) return { siteId, at, decisions: [], changes: [] };
    const wanted = kinds.filter((k) => !site.disabled.has(k));
    if (wanted.length === 0) return { siteId, at, decisions: [], changes: [] };
    // Gateway silence alone needs no samples: the newest reading time is enough.
    const needsSeries = wanted.some((k) => k !== 'gateway_silent');
    const [active, series, lastT] = await Promise.all([
      this.alerts.active(this.alerts.database, siteId),
      needsSeries ? this.data.series(siteId, at) : Promise.resolve<SeriesMap>({}),
      this.data.lastReadingT(siteId, at),
    ]);
    const newest = Math.max(lastT ?? -Infinity, newestSample(series));
    const last = Number.isFinite(newest) ? Math.min(newest, nowT) : null;
    const input: RuleInput = {
      nowT,
      site: site.config,
      series,
      lastReadingT: Object.fromEntries(site.config.gateways.map((g) => [g.id, last])),
      openAlerts: AlertsRepository.asOpenAlerts(active),
    };
    const decisions: RuleDecision[] = [];
    for (const kind of wanted) {
      try {
        decisions.push(...RULE_EVALUATORS[kind](input, site.overrides));
      } catch (error) {
        this.logger.error({ err: error, siteId, kind }, 'rule evaluator failed');
      }
    }
    const changes = await this.lifecycle.apply(siteId, decisions, at);
    return { siteId, at, decisions, changes };
  }
}

function newestSample(series: SeriesMap): number {
  let newest = -Infinity;
  for (const samples of Object.values(series)) {
    const last = samples[samples.length - 1];
    if (last && last.t > newest) newest = last.t;
  }
  return newest;
}
