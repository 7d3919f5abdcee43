/**
 * A fleet of simulated sites, each with its gateway link. The same loop serves every mode:
 * `backfill` runs simulated time as fast as ingest acknowledges (in order, with back-pressure),
 * `runLive` follows the wall clock, optionally faster (a time factor) but never ahead of it
 * (ingest refuses readings from the future). Gateway faults act here: an offline gateway
 * queues its readings and sends them when its link returns; a bad-payload fault sends a broken
 * pack every ten minutes of simulated time.
 */
import type { OutgoingReading } from '@wellkept/core';
import {
  BAD_PAYLOAD_INTERVAL_SECONDS,
  BAD_PAYLOAD_KINDS,
  badPayload,
} from '../faults/bad-payloads.js';
import type { ScheduledFault } from '../faults/fault-kinds.js';
import {
  type GatewayCredentials,
  GatewayLink,
  type GatewayLinkStats,
} from '../gateway/gateway-link.js';
import { SiteSimulation } from '../physics/site-simulation.js';
import type { SiteSpec } from '../site-spec.js';

export interface FleetOptions {
  url: string;
  sites: readonly { site: SiteSpec; credentials: GatewayCredentials }[];
  faults: readonly ScheduledFault[];
  /** Simulated time at which every site starts, epoch seconds. */
  startT: number;
  /** Reporting interval, seconds of simulated time. Default 30. */
  reportSeconds?: number;
  seed?: number;
  maxQueuedReadings?: number;
  log?: (line: string) => void;
}

export interface FleetMember {
  sim: SiteSimulation;
  link: GatewayLink;
  nextBadT: number;
  badCount: number;
}

/** Readings each link may have waiting before the backfill waits for acknowledgements. */
const BACKFILL_HIGH_WATER = 20_000;

export class Fleet {
  readonly members: FleetMember[];
  /** Reporting interval, seconds of simulated time (history may use a coarser one). */
  reportSeconds: number;
  private readonly log: (line: string) => void;
  private stopped = false;

  constructor(private readonly options: FleetOptions) {
    this.reportSeconds = options.reportSeconds ?? 30;
    this.log = options.log ?? (() => {});
    this.members = options.sites.map(({ site, credentials }) => {
      const link = new GatewayLink({
        url: options.url,
        credentials,
        ...(options.maxQueuedReadings ? { maxQueuedReadings: options.maxQueuedReadings } : {}),
      });
      let lastError = '';
      link.on('error', (error) => {
        // One line per distinct error, not one per reconnection attempt.
        if (error.message !== lastError) this.log(`${link.gatewayId}: ${error.message}`);
        lastError = error.message;
      });
      link.on('connect', () => {
        lastError = '';
      });
      const sim = new SiteSimulation(site, {
        startT: options.startT,
        faults: options.faults,
        ...(options.seed !== undefined ? { seed: options.seed } : {}),
      });
      return { sim, link, nextBadT: options.startT, badCount: 0 };
    });
  }

  /** Opens every gateway's connection. */
  connect(): void {
    for (const m of this.members) m.link.start();
  }

  /** Simulated time of the fleet (the slowest member), epoch seconds. */
  get t(): number {
    return Math.min(...this.members.map((m) => m.sim.t));
  }

  /** Runs the physics silently to `t` (what was already sent before a restart). */
  skipTo(member: FleetMember, t: number): void {
    const step = this.reportSeconds;
    while (member.sim.t + step <= t) {
      member.sim.advanceTo(member.sim.t + step);
      member.sim.takeSwitchEvents();
    }
    member.nextBadT = Math.max(member.nextBadT, member.sim.t);
  }

  /**
   * Sends simulated history up to `toT` as fast as ingest acknowledges, in order. Resolves when
   * every reading sent has been acknowledged (readings of a gateway whose link is down in the
   * simulated history stay queued for later).
   */
  async backfill(toT: number, onProgress?: (t: number) => void): Promise<void> {
    let lastProgress = 0;
    for (;;) {
      let advanced = false;
      for (const m of this.members) {
        const next = m.sim.t + this.reportSeconds;
        if (next > toT) continue;
        advanced = true;
        this.report(m, next, false);
      }
      if (!advanced || this.stopped) break;
      for (const m of this.members) {
        if (m.link.backlog > BACKFILL_HIGH_WATER) await m.link.below(BACKFILL_HIGH_WATER / 2);
      }
      if (onProgress && Date.now() - lastProgress > 5000) {
        lastProgress = Date.now();
        onProgress(this.t);
      }
    }
    for (const m of this.members) m.link.flush();
    await Promise.all(
      this.members.map((m) =>
        m.sim.faultActive('gateway_offline') ? Promise.resolve() : m.link.drained(),
      ),
    );
  }

  /**
   * Follows the wall clock from the fleet's current simulated time at `speed` × real time,
   * capped at the wall clock, until `untilT` (simulated) or until stopped.
   */
  async runLive(options: { speed: number; untilT?: number; onTick?: () => void }): Promise<void> {
    const speed = options.speed;
    const wallStart = Date.now() / 1000;
    const simStart = this.t;
    const tickMs = Math.max(20, (this.reportSeconds * 1000) / speed);
    // Out of a backfill: an offline gateway drops its connection for real; the rest send on.
    for (const m of this.members) {
      await this.linkState(m);
      m.link.hold(false);
    }
    while (!this.stopped) {
      const wallNow = Date.now() / 1000;
      // Real time follows the wall clock (a start in the past is caught up at once); a time
      // factor runs from the start at that factor until it meets the wall clock.
      const paced = speed === 1 ? wallNow : simStart + (wallNow - wallStart) * speed;
      const target = Math.min(paced, wallNow, options.untilT ?? Infinity);
      for (const m of this.members) {
        while (m.sim.t + this.reportSeconds <= target) {
          this.report(m, m.sim.t + this.reportSeconds, true);
          await this.linkState(m);
        }
      }
      options.onTick?.();
      if (options.untilT !== undefined && this.t + this.reportSeconds > options.untilT) break;
      await new Promise((resolve) => setTimeout(resolve, tickMs));
    }
  }

  /** One report of one site at simulated time `t`. */
  private report(m: FleetMember, t: number, live: boolean): void {
    m.sim.advanceTo(t);
    const readings: OutgoingReading[] = [...m.sim.takeSwitchEvents(), ...m.sim.readings()];
    const offline = Boolean(m.sim.faultActive('gateway_offline', t));
    if (!live) m.link.hold(offline);
    m.link.enqueue(readings, { sendPartial: live });
    if (m.sim.faultActive('bad_payloads', t) && t >= m.nextBadT && !offline) {
      m.nextBadT = t + BAD_PAYLOAD_INTERVAL_SECONDS;
      const kind = BAD_PAYLOAD_KINDS[m.badCount % BAD_PAYLOAD_KINDS.length]!;
      m.badCount += 1;
      const good = readings.find((r) => typeof r.value === 'number') ?? readings[0];
      if (good) {
        const tank = m.sim.site.tanks.find((x) => x.kind === 'storage')?.key ?? null;
        m.link.publishRaw(badPayload(kind, m.link.gatewayId, good, tank, Date.now() / 1000));
      }
    }
  }

  /** In live modes a gateway_offline fault really drops the connection (the will fires). */
  private async linkState(m: FleetMember): Promise<void> {
    await m.link.setLinkUp(!m.sim.faultActive('gateway_offline'));
  }

  stats(): { gatewayId: string; t: number; link: GatewayLinkStats }[] {
    return this.members.map((m) => ({
      gatewayId: m.link.gatewayId,
      t: m.sim.t,
      link: m.link.stats(),
    }));
  }

  /** Stops the loops and disconnects every gateway (status `offline`, retained). */
  async stop(): Promise<void> {
    this.stopped = true;
    await Promise.all(this.members.map((m) => m.link.stop()));
  }
}
