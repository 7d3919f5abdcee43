/**
 * Runs a simulated site through core's rule evaluators as the product would: readings arrive as
 * the gateway sends them (none while its link is down, the backlog when it returns), and every
 * so often the rules look at the last two days and open, keep or clear alerts. Used by the
 * tests ("each fault produces the signature its rule detects") and by `simulate check`.
 */
import {
  ALERT_KINDS,
  type AlertKind,
  type OpenAlert,
  type RuleDecision,
  type RuleParamsOverrides,
  type Sample,
  type SeriesMap,
  evaluateRules,
} from '@wellkept/core';
import type { ScheduledFault } from '../faults/fault-kinds.js';
import { SiteSimulation } from '../physics/site-simulation.js';
import type { SiteSpec } from '../site-spec.js';
import { ruleSiteConfig } from './rule-site-config.js';

export interface ReplayOptions {
  site: SiteSpec;
  faults?: readonly ScheduledFault[];
  fromT: number;
  toT: number;
  /** Gateway reporting interval, seconds. Default 60. */
  reportSeconds?: number;
  /** Simulated time before `fromT` to settle the site (charge, tank levels). Default 1 day. */
  warmUpSeconds?: number;
  seed?: number;
  /** Per-site rule thresholds, as an installer would set them. */
  overrides?: RuleParamsOverrides;
  /** Called after each report with the simulation, for extra checks. */
  onReport?: (sim: SiteSimulation) => void;
}

/** An alert opening or clearing, with when and why. */
export interface AlertChange {
  t: number;
  kind: AlertKind;
  subject: string;
  action: 'open' | 'clear';
  summary: string;
}

export interface ReplayResult {
  changes: AlertChange[];
  /** Alerts still open at the end. */
  open: OpenAlert[];
  /** Every reading delivered, per channel (for physics checks). */
  series: Map<string, Sample<number | boolean | string>[]>;
  simulation: SiteSimulation;
}

/**
 * How much recent data each rule is given, and how often it runs. Each rule needs less than two
 * days (core: "at least the last two days is enough for every rule"); giving each only what it
 * reads keeps a simulated week of evaluations to seconds.
 */
const RULE_WINDOWS: Readonly<Record<AlertKind, { windowSeconds: number; everySeconds: number }>> = {
  low_charge: { windowSeconds: 30 * 3600, everySeconds: 3600 },
  overnight_sag: { windowSeconds: 30 * 3600, everySeconds: 3600 },
  float_stuck: { windowSeconds: 3 * 3600, everySeconds: 900 },
  dry_run: { windowSeconds: 3 * 3600, everySeconds: 900 },
  short_cycling: { windowSeconds: 25 * 3600, everySeconds: 900 },
  gateway_silent: { windowSeconds: 2 * 86_400, everySeconds: 900 },
  water_low: { windowSeconds: 2 * 86_400, everySeconds: 3600 },
  // Core's no_charge works out the clear-sky output at every sample it is given (the full solar
  // position each time): it gets just over its two-hour hold and runs every half hour.
  no_charge: { windowSeconds: 2.5 * 3600, everySeconds: 1800 },
};

export function replayAlerts(options: ReplayOptions): ReplayResult {
  const report = options.reportSeconds ?? 60;
  const every = 900;
  const warmUp = options.warmUpSeconds ?? 86_400;
  const faults = options.faults ?? [];
  const sim = new SiteSimulation(options.site, {
    startT: options.fromT - warmUp,
    faults,
    ...(options.seed !== undefined ? { seed: options.seed } : {}),
  });
  sim.advanceTo(options.fromT);
  sim.takeSwitchEvents();
  const config = ruleSiteConfig(options.site, report);
  const series = new Map<string, Sample<number | boolean | string>[]>();
  const backlog: { name: string; t: number; value: number | boolean | string }[] = [];
  const deliver = (r: { name: string; t: number; value: number | boolean | string }) => {
    let list = series.get(r.name);
    if (!list) series.set(r.name, (list = []));
    list.push({ t: r.t, v: r.value });
  };
  let open: OpenAlert[] = [];
  const changes: AlertChange[] = [];
  let nextEvaluation = options.fromT + every;

  for (let t = options.fromT + report; t <= options.toT; t += report) {
    sim.advanceTo(t);
    const readings = [...sim.takeSwitchEvents(), ...sim.readings()];
    if (sim.faultActive('gateway_offline', t)) {
      backlog.push(...readings);
    } else {
      for (const r of backlog) deliver(r);
      backlog.length = 0;
      for (const r of readings) deliver(r);
    }
    options.onReport?.(sim);
    if (t >= nextEvaluation) {
      nextEvaluation += every;
      for (const kind of ALERT_KINDS) {
        const rule = RULE_WINDOWS[kind];
        if (t % rule.everySeconds >= every) continue;
        const decisions = evaluateRules(
          {
            nowT: t,
            site: config,
            series: windowed(series, t - rule.windowSeconds),
            openAlerts: open,
          },
          options.overrides,
          [kind],
        );
        open = applyDecisions(open, decisions, t, changes);
      }
    }
  }
  return { changes, open, series, simulation: sim };
}

function windowed(
  series: Map<string, Sample<number | boolean | string>[]>,
  fromT: number,
): SeriesMap {
  const out: Record<string, Sample<number | boolean | string>[]> = {};
  for (const [name, list] of series) {
    // Sorted by time (see deliver): binary search for the window's start.
    let lo = 0;
    let hi = list.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if ((list[mid] as Sample<unknown>).t < fromT) lo = mid + 1;
      else hi = mid;
    }
    out[name] = list.slice(lo);
  }
  return out;
}

function applyDecisions(
  open: OpenAlert[],
  decisions: RuleDecision[],
  t: number,
  changes: AlertChange[],
): OpenAlert[] {
  let next = open;
  for (const d of decisions) {
    if (d.action === 'open') {
      next = [
        ...next,
        { kind: d.kind, subject: d.subject, openedT: t, severity: d.severity ?? 'watch' },
      ];
      changes.push({ t, kind: d.kind, subject: d.subject, action: 'open', summary: d.summary });
    } else if (d.action === 'clear') {
      next = next.filter((a) => !(a.kind === d.kind && a.subject === d.subject));
      changes.push({ t, kind: d.kind, subject: d.subject, action: 'clear', summary: d.summary });
    }
  }
  return next;
}
