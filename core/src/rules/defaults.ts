/**
 * Thresholds of every rule: a typed parameter object per alert kind, defaults that depend on the
 * battery chemistry and the equipment, and per-site overrides (with per-equipment overrides for
 * the rules that look at one pump, tank or switch).
 */
import { isLeadAcid } from '../battery/chemistry-curves.js';
import type { AlertKind, SiteConfig } from './types.js';

/** Battery low: estimated state of charge under the floor for a while. */
export interface LowChargeParams {
  /** Opens below this state of charge (0–1). Default 0.5 lead-acid, 0.2 LiFePO4. */
  floorFraction: number;
  /** Clears above this (hysteresis). Default floor + 0.1. */
  clearAboveFraction: number;
  /** Severity 'act' below this. Default 0.3 lead-acid, 0.1 LiFePO4. */
  actBelowFraction: number;
  /** The estimate must stay under the floor this long, seconds. Default 1800. */
  holdSeconds: number;
}

/** Overnight sag: voltage fell further overnight than the limit, or dawn voltage under the floor. */
export interface OvernightSagParams {
  /**
   * Largest normal fall from an hour after sunset to dawn, volts per cell. Default 0.042
   * lead-acid (0.5 V on 24 V), 0.1 LiFePO4 (0.8 V on 24 V): a LiFePO4 bank put to rest full sits
   * on the steep top of its curve (core's rest curve falls 0.086 V a cell from 100 % to 90 %), so
   * an ordinary night loses more than a lead-acid limit would allow; the dawn floor catches a
   * bank driven off the plateau. Common practice, tuned on the simulator's normal weeks.
   */
  maxDropVoltsPerCell: number;
  /** Lowest acceptable dawn voltage, volts per cell. Default 2.02 lead-acid (24.24 V on 24 V), 3.1 LiFePO4. */
  dawnFloorVoltsPerCell: number;
  /** Time after sunset before the dusk reading, so the charge has settled, seconds. Default 3600. */
  settleSeconds: number;
  /** A night clears the alert when its fall is under this share of the limit. Default 0.8. */
  clearDropShare: number;
}

/** Float not switching: pump runs against a full tank, or the tank is low and the float does not call. */
export interface FloatStuckParams {
  /** Tank share counted as full. Default 0.95. */
  fullFraction: number;
  /** Tank share counted as low. Default 0.25. */
  lowFraction: number;
  /** How long the faulty state must last before opening, seconds. Default 600. */
  holdSeconds: number;
  /** How long the healthy state must last before clearing, seconds. Default 900. */
  clearHoldSeconds: number;
}

/** Running dry: pump on but drawing well under rated current, or no rise in the tank while it runs. */
export interface DryRunParams {
  /** Opens when current stays under this share of rated current. Default 0.6. */
  lowCurrentFraction: number;
  /** Clears when a run draws at least this share. Default 0.75. */
  clearCurrentFraction: number;
  /** The low current must last this long while running, seconds. Default 180. */
  holdSeconds: number;
  /** Runs at least this long are checked for tank rise, seconds. Default 1200. */
  noRiseMinRunSeconds: number;
  /** A run must deliver at least this share of rated flow × run time. Default 0.2. */
  minDeliveredShareOfRated: number;
  /** PV-direct pumps are checked for low current only when their array gives at least this share of its rating. Default 0.5. */
  minPvShareForCurrentCheck: number;
}

/** Short cycling: more starts than the motor allows, or runs shorter than a minute. */
export interface ShortCyclingParams {
  maxStartsPerHour: number;
  /** Default 300 for motors up to about 0.75 hp (common practice: makers' motor manuals; memory), 100 above. */
  maxStartsPerDay: number;
  /** A burst: more than `maxStartsPerBurst` starts inside `burstWindowSeconds`. Defaults 5 in 600 s. */
  burstWindowSeconds: number;
  maxStartsPerBurst: number;
  /** Runs shorter than this are short, seconds. Default 60 (common practice). */
  minRunSeconds: number;
  /** Short runs in the last hour that open the alert. Default 3. */
  shortRunsPerHourToAlert: number;
}

/** Gateway silent: no data for several reporting intervals. */
export interface GatewaySilentParams {
  /** Used when a gateway has no interval of its own, seconds. Default 60. */
  defaultReportingIntervalSeconds: number;
  /** Opens after this many intervals without data. Default 5. */
  silentAfterIntervals: number;
  /** Severity 'act' after this long, seconds. Default 6 h. */
  actAfterSeconds: number;
  /** Clears when data are newer than this many intervals. Default 2. */
  clearWithinIntervals: number;
}

/** Water low: days of water left under the floor. */
export interface WaterLowParams {
  floorDays: number;
  actBelowDays: number;
  clearAboveDays: number;
  /** Days of level history to average use over. Default 3. */
  useWindowDays: number;
}

/** Not charging: daylight and a clear-sky expectation, but no charge. */
export interface NoChargeParams {
  /** Only instants when the clear-sky expectation is at least this share of the arrays' rating count. Default 0.3. */
  minExpectedShareOfRated: number;
  /** Opens when measured charge power stays under this share of the clear-sky expectation. Default 0.05 (clouds still give 10–30 %). */
  maxMeasuredShareOfExpected: number;
  /** How long, seconds. Default 7200. */
  holdSeconds: number;
  /** Severity 'act' when it lasts this long, seconds. Default 5 h. */
  actAfterSeconds: number;
  /** Clears when the last half hour averages at least this share. Default 0.2. */
  clearShareOfExpected: number;
}

/** Parameters of every rule. */
export interface RuleParams {
  low_charge: LowChargeParams;
  overnight_sag: OvernightSagParams;
  float_stuck: FloatStuckParams;
  dry_run: DryRunParams;
  short_cycling: ShortCyclingParams;
  gateway_silent: GatewaySilentParams;
  water_low: WaterLowParams;
  no_charge: NoChargeParams;
}

/** Per-site overrides: any field of any rule, and per-equipment fields keyed by subject. */
export type RuleParamsOverrides = {
  [K in AlertKind]?: Partial<RuleParams[K]> & {
    bySubject?: Readonly<Record<string, Partial<RuleParams[K]>>>;
  };
};

/** Motors up to this rating get the 300-starts-a-day default, watts (about 0.75 hp). */
const SMALL_MOTOR_WATTS = 560;

/**
 * The default thresholds for a site, from its battery chemistry; the API shows them in forms.
 * Per-pump defaults (starts per day) come from {@link ruleParamsFor}.
 */
export function defaultRuleParams(site: Pick<SiteConfig, 'battery'>): RuleParams {
  const leadAcid = site.battery ? isLeadAcid(site.battery.chemistry) : true;
  const floor = leadAcid ? 0.5 : 0.2;
  return {
    low_charge: {
      floorFraction: floor,
      clearAboveFraction: floor + 0.1,
      actBelowFraction: leadAcid ? 0.3 : 0.1,
      holdSeconds: 1800,
    },
    overnight_sag: {
      maxDropVoltsPerCell: leadAcid ? 0.042 : 0.1,
      dawnFloorVoltsPerCell: leadAcid ? 2.02 : 3.1,
      settleSeconds: 3600,
      clearDropShare: 0.8,
    },
    float_stuck: { fullFraction: 0.95, lowFraction: 0.25, holdSeconds: 600, clearHoldSeconds: 900 },
    dry_run: {
      lowCurrentFraction: 0.6,
      clearCurrentFraction: 0.75,
      holdSeconds: 180,
      noRiseMinRunSeconds: 1200,
      minDeliveredShareOfRated: 0.2,
      minPvShareForCurrentCheck: 0.5,
    },
    short_cycling: {
      maxStartsPerHour: 15,
      maxStartsPerDay: 300,
      burstWindowSeconds: 600,
      maxStartsPerBurst: 5,
      minRunSeconds: 60,
      shortRunsPerHourToAlert: 3,
    },
    gateway_silent: {
      defaultReportingIntervalSeconds: 60,
      silentAfterIntervals: 5,
      actAfterSeconds: 6 * 3600,
      clearWithinIntervals: 2,
    },
    water_low: { floorDays: 2, actBelowDays: 1, clearAboveDays: 3, useWindowDays: 3 },
    no_charge: {
      minExpectedShareOfRated: 0.3,
      maxMeasuredShareOfExpected: 0.05,
      holdSeconds: 7200,
      actAfterSeconds: 5 * 3600,
      clearShareOfExpected: 0.2,
    },
  };
}

/**
 * The parameters of one rule for one subject: defaults, then the site's overrides, then the
 * subject's own overrides. Short cycling gets 100 starts a day for motors over about 0.75 hp.
 */
export function ruleParamsFor<K extends AlertKind>(
  kind: K,
  site: SiteConfig,
  overrides: RuleParamsOverrides | undefined,
  subject = '',
): RuleParams[K] {
  const base = { ...defaultRuleParams(site)[kind] } as RuleParams[K];
  if (kind === 'short_cycling') {
    const pump = site.pumps.find((p) => p.key === subject);
    if (pump?.ratedWatts && pump.ratedWatts > SMALL_MOTOR_WATTS) {
      (base as ShortCyclingParams).maxStartsPerDay = 100;
    }
  }
  const siteLevel = overrides?.[kind];
  if (!siteLevel) return base;
  const { bySubject, ...fields } = siteLevel as Partial<RuleParams[K]> & {
    bySubject?: Readonly<Record<string, Partial<RuleParams[K]>>>;
  };
  return {
    ...base,
    ...definedOnly(fields),
    ...definedOnly(bySubject?.[subject] ?? {}),
  } as RuleParams[K];
}

function definedOnly<T extends object>(fields: T): Partial<T> {
  const out: Partial<T> = {};
  for (const [key, value] of Object.entries(fields)) {
    if (typeof value === 'number' && Number.isFinite(value))
      (out as Record<string, unknown>)[key] = value;
  }
  return out;
}
