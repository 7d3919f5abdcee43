import {
  Inject,
  Injectable,
  type BeforeApplicationShutdown,
  type OnApplicationBootstrap,
} from '@nestjs/common';
import { OnEvent } from '@nestjs/event-emitter';
import type { AlertKind } from '@wellkept/core';
import type { Logger } from 'pino';
import { LOGGER } from '../logging/logger.js';
import { CLOCK, type Clock } from '../notifications/clock.js';
import { MorningSummaryService } from '../notifications/morning-summary.service.js';
import { SITE_UPDATED, type SiteUpdatedEvent } from '../site-updates/site-updates.js';
import { AlertsRepository } from './alerts.repository.js';
import { RULES_CONFIG, type RulesConfig } from './rules-config.js';
import { DATA_KINDS, RulesEvaluationService } from './rules-evaluation.service.js';
import { approximateLastSunrise } from './approximate-dawn.js';
import { RuleDataRepository } from './rule-data.repository.js';
import { surelyReporting } from './silence-screen.js';
import { SiteConfigRepository } from './site-config.repository.js';

/** How far the approximate sunrise may differ from the SPA's, seconds (with room to spare). */
const DAWN_SLACK_S = 600;

/**
 * When the rules run:
 * - after a site's data commits (the in-process `site.updated` event of ingest), debounced per
 *   site: the first event starts a timer of RULES_DEBOUNCE_MS and later ones ride along, so a
 *   day of back-filled packs costs one evaluation, not thousands; and at most once per
 *   RULES_MIN_INTERVAL_MS per site (up to half as long again, at random, so sites that
 *   reported together drift apart), so a fleet reporting every 30 s costs evaluations in
 *   proportion to its sites, not to its packs;
 * - on a tick (RULES_TICK_MS): gateway silence for every watched site (evaluated only where
 *   it may change something: silence-screen.ts), overnight sag once per night after each site's
 *   own sunrise (plus a grace for late data), and a full evaluation of sites that have had none
 *   for RULES_FULL_EVERY_MS (water low, not charging, held faults); then the morning summaries
 *   that have come due.
 * Evaluations of one site never overlap, and at most RULES_CONCURRENCY sites run at once.
 */
@Injectable()
export class RulesSchedulerService implements OnApplicationBootstrap, BeforeApplicationShutdown {
  private readonly debounce = new Map<string, NodeJS.Timeout>();
  /** Per site: the kinds waiting for the next run, and the run in progress. */
  private readonly waiting = new Map<string, Set<AlertKind>>();
  private readonly running = new Map<string, Promise<void>>();
  /** Sites waiting for a free evaluation slot, in arrival order (a Set: O(1) to take the first). */
  private readonly queue = new Set<string>();
  private active = 0;
  private readonly lastFull = new Map<string, number>();
  /** Per site: when its data rules may next be started by new data (real time, ms). */
  private readonly nextDataRun = new Map<string, number>();
  /** Per site: the dawn (epoch s) of the last night judged for overnight sag. */
  private readonly judgedDawn = new Map<string, number>();
  private timer: NodeJS.Timeout | undefined;
  private ticking: Promise<void> | null = null;
  private stopped = false;
  private idleWaiters: (() => void)[] = [];

  constructor(
    private readonly evaluation: RulesEvaluationService,
    private readonly sites: SiteConfigRepository,
    private readonly data: RuleDataRepository,
    private readonly alerts: AlertsRepository,
    private readonly summaries: MorningSummaryService,
    @Inject(RULES_CONFIG) private readonly config: RulesConfig,
    @Inject(CLOCK) private readonly clock: Clock,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {}

  onApplicationBootstrap(): void {
    const next = () => {
      if (this.stopped) return;
      this.timer = setTimeout(() => {
        void this.tick()
          .catch((e: unknown) => this.logger.error({ err: e }, 'rules tick failed'))
          .finally(next);
      }, this.config.tickMs);
      this.timer.unref();
    };
    next();
  }

  async beforeApplicationShutdown(): Promise<void> {
    this.stopped = true;
    clearTimeout(this.timer);
    for (const t of this.debounce.values()) clearTimeout(t);
    this.debounce.clear();
    this.queue.clear();
    await this.ticking?.catch(() => undefined);
    await Promise.all([...this.running.values()]);
  }

  @OnEvent(SITE_UPDATED)
  onSiteUpdated(event: SiteUpdatedEvent): void {
    // Our own alert changes come back on the same event; they are not new data.
    if (!event.what.some((w) => w !== 'alerts')) return;
    this.dataArrived(event.siteId);
  }

  /**
   * New data at a site: evaluate the data rules after the debounce, and no sooner than
   * RULES_MIN_INTERVAL_MS after the site's last data-triggered run, plus up to half as long
   * again at random. Without the random part, a fleet that connected together (an ingest
   * restart, every gateway back within the same minute) is judged in the same bunched wave
   * every interval, each wave a burst of work on the event loop that answers the PUBACKs; with
   * it, the waves spread out further with every interval.
   */
  dataArrived(siteId: string): void {
    if (this.stopped || this.debounce.has(siteId)) return;
    const due = this.nextDataRun.get(siteId) ?? Number.NEGATIVE_INFINITY;
    const wait = Math.max(this.config.debounceMs, due - Date.now());
    const timer = setTimeout(() => {
      this.debounce.delete(siteId);
      const spread = 1 + Math.random() / 2;
      this.nextDataRun.set(siteId, Date.now() + this.config.minIntervalMs * spread);
      this.request(siteId, DATA_KINDS);
    }, wait);
    timer.unref();
    this.debounce.set(siteId, timer);
  }

  /** Queues an evaluation of the given kinds (merged with any already waiting). */
  request(siteId: string, kinds: readonly AlertKind[]): void {
    if (this.stopped) return;
    const waiting = this.waiting.get(siteId);
    if (waiting) {
      for (const k of kinds) waiting.add(k);
      return;
    }
    this.waiting.set(siteId, new Set(kinds));
    if (!this.running.has(siteId)) this.queue.add(siteId);
    this.pump();
  }

  /** Resolves once no tick runs and no evaluation is pending, debounced or running (tests). */
  async settled(): Promise<void> {
    await this.ticking?.catch(() => undefined);
    await this.idle();
  }

  /** Resolves when nothing is debounced, waiting or running, or at `until` (epoch ms). */
  private async idle(until = Number.POSITIVE_INFINITY): Promise<void> {
    while (
      (this.debounce.size > 0 || this.waiting.size > 0 || this.running.size > 0) &&
      Date.now() < until
    ) {
      await new Promise<void>((resolve) => {
        this.idleWaiters.push(resolve);
        setTimeout(resolve, 20);
      });
    }
  }

  /** One round of the time-based rules; concurrent calls share it. */
  tick(): Promise<void> {
    if (this.ticking) return this.ticking;
    this.ticking = this.tickOnce().finally(() => {
      this.ticking = null;
    });
    return this.ticking;
  }

  private async tickOnce(): Promise<void> {
    const now = this.clock.now();
    const nowT = now.getTime() / 1000;
    const ids = await this.sites.watchedSiteIds();
    const configs = await this.sites.load(ids);
    const [newestT, withOpenAlert] = await Promise.all([
      this.data.newestChannelTimes(ids),
      this.alerts.sitesWithActive('gateway_silent'),
    ]);
    for (const [i, id] of ids.entries()) {
      // Let socket reads and commits (PUBACKs) run between slices of a large fleet.
      if (i % 200 === 199) await new Promise((resolve) => setImmediate(resolve));
      const kinds = new Set<AlertKind>();
      if (nowT * 1000 - (this.lastFull.get(id) ?? -Infinity) >= this.config.fullEveryMs) {
        for (const k of DATA_KINDS) kinds.add(k);
      }
      const site = configs.get(id);
      if (site?.config.battery && (await this.overnightDue(id, site.config, nowT))) {
        kinds.add('overnight_sag');
      }
      // Every site's gateways are judged each round; a site surely reporting needs no
      // evaluation for that alone (silence-screen.ts).
      if (
        kinds.size > 0 ||
        !site ||
        !surelyReporting(site, newestT.get(id), withOpenAlert.has(id), nowT)
      ) {
        kinds.add('gateway_silent');
      }
      if (kinds.size > 0) this.request(id, [...kinds]);
    }
    // Wait for this round's evaluations, but at most a tick: at a busy fleet, commits keep some
    // site debounced or running at every moment, and a round that waited for a fully idle
    // scheduler would never end, so no later round would ever judge a gateway gone silent.
    await this.idle(Date.now() + this.config.tickMs);
    await this.summaries.run();
  }

  /**
   * Whether the site's last complete night has ended (plus grace) and was not judged yet. The
   * night's end comes from a quick sunrise (approximate-dawn.ts, microseconds): the full SPA
   * here cost ~50 ms a site, which at 10,000 sites held the event loop for minutes per tick.
   */
  private async overnightDue(
    siteId: string,
    config: { location: { latitudeDegrees: number; longitudeDegrees: number } },
    nowT: number,
  ): Promise<boolean> {
    const judged = this.judgedDawn.get(siteId);
    // The next night cannot end sooner than ~20 h after the last dawn judged.
    if (judged !== undefined && nowT < judged + 20 * 3600) return false;
    const dawn = approximateLastSunrise(nowT, config.location);
    // Polar day or night, or the night ended too recently (late data may still come).
    if (dawn === null || nowT < dawn + this.config.dawnGraceSeconds) return false;
    if (judged !== undefined && judged >= dawn - DAWN_SLACK_S) return false;
    this.judgedDawn.set(siteId, dawn);
    // After a restart: a history event since that dawn means the night was judged already.
    return !(await this.alerts.anyEventSince(
      siteId,
      'overnight_sag',
      new Date((dawn - DAWN_SLACK_S) * 1000),
    ));
  }

  private pump(): void {
    while (this.active < this.config.concurrency && this.queue.size > 0) {
      const siteId = this.queue.values().next().value!;
      this.queue.delete(siteId);
      const kinds = this.waiting.get(siteId);
      this.waiting.delete(siteId);
      if (!kinds || kinds.size === 0) continue;
      this.active += 1;
      const run = this.runOne(siteId, [...kinds]).finally(() => {
        this.active -= 1;
        this.running.delete(siteId);
        if (this.waiting.has(siteId)) this.queue.add(siteId);
        this.pump();
        if (this.debounce.size === 0 && this.waiting.size === 0 && this.running.size === 0) {
          for (const w of this.idleWaiters.splice(0)) w();
        }
      });
      this.running.set(siteId, run);
    }
  }

  private async runOne(siteId: string, kinds: AlertKind[]): Promise<void> {
    try {
      if (DATA_KINDS.every((k) => kinds.includes(k))) {
        this.lastFull.set(siteId, this.clock.now().getTime());
      }
      await this.evaluation.evaluate(siteId, kinds);
    } catch (error) {
      this.logger.error({ err: error, siteId }, 'rules evaluation failed');
    }
  }
}
