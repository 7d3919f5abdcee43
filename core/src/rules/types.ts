/**
 * Plain-data inputs and outputs of the rule evaluators, shaped so a database layer can fill them:
 * the site's equipment, recent samples per channel, pump runs, the alerts already open, and now.
 */
import type { Sample } from '../series.js';
import type { BatteryBankConfig } from '../battery/state-of-charge.js';
import type { PumpConfig, PumpRun } from '../pumps/pump-runs.js';
import type { TankConfig } from '../tanks/tank-volume.js';
import type { PvArrayConfig } from '../sun/pv-output.js';
import type { SiteLocation } from '../sun/solar-position.js';

/** Alert kinds (keys in code), one evaluator each. */
export type AlertKind =
  | 'low_charge'
  | 'overnight_sag'
  | 'float_stuck'
  | 'dry_run'
  | 'short_cycling'
  | 'gateway_silent'
  | 'water_low'
  | 'no_charge';

/** Every alert kind, in the order screens list them. */
export const ALERT_KINDS: readonly AlertKind[] = [
  'low_charge',
  'overnight_sag',
  'float_stuck',
  'dry_run',
  'short_cycling',
  'gateway_silent',
  'water_low',
  'no_charge',
];

/** Labels for screens and e-mails (our names). */
export const ALERT_LABELS: Readonly<Record<AlertKind, string>> = {
  low_charge: 'Battery low',
  overnight_sag: 'Overnight sag',
  float_stuck: 'Float not switching',
  dry_run: 'Running dry',
  short_cycling: 'Short cycling',
  gateway_silent: 'Gateway silent',
  water_low: 'Water low',
  no_charge: 'Not charging',
};

/** How urgent an alert is: `watch` (a warning) or `act` (needs a visit or an owner's action now). */
export type AlertSeverity = 'watch' | 'act';

/** How a float switch is wired into the fill control. */
export interface FloatSwitchConfig {
  /** Equipment key, the `<switch>` in `float/<switch>/closed`. */
  key: string;
  /** The tank it sits in. */
  tankKey: string;
  /** The pump it controls, or null. */
  pumpKey: string | null;
  /**
   * 'closed_calls': contacts close when the water is low and the pump should run (a pump-up float);
   * 'open_calls': contacts open to call for water.
   */
  logic: 'closed_calls' | 'open_calls';
}

/** A gateway of the site. */
export interface GatewayConfig {
  id: string;
  /** How often it publishes, seconds. Default 60. */
  reportingIntervalSeconds?: number;
}

/** What powers a pump: its own PV array directly, the battery bank (through a controller), or the grid/generator. */
export type PumpSupply = 'pv_direct' | 'battery' | 'ac';

/** A pump as the rules see it: the pump plus how it is supplied. */
export interface RulePumpConfig extends PumpConfig {
  supply?: PumpSupply;
  /** For PV-direct pumps: the array that feeds it. */
  pvArrayKey?: string | null;
}

/** A tank as the rules see it. */
export interface RuleTankConfig extends TankConfig {
  /** Water that should not be counted as usable (below the outlet), m³. Default 0. */
  reserveCubicMetres?: number;
}

/** Everything configured at a site that the rules need. */
export interface SiteConfig {
  /** IANA time zone of the site. */
  timeZone: string;
  location: SiteLocation;
  battery: BatteryBankConfig | null;
  pvArrays: readonly PvArrayConfig[];
  pumps: readonly RulePumpConfig[];
  tanks: readonly RuleTankConfig[];
  floatSwitches: readonly FloatSwitchConfig[];
  gateways: readonly GatewayConfig[];
}

/** Samples per channel, keyed by measurement name ('battery/voltage', 'tank/main/level' …). */
export type SeriesMap = Readonly<Record<string, readonly Sample<number | boolean | string>[]>>;

/** An alert that is open now. */
export interface OpenAlert {
  kind: AlertKind;
  /** Equipment key or gateway id, or '' for site-wide alerts. */
  subject: string;
  openedT: number;
  severity: AlertSeverity;
}

/** The input of every evaluator. */
export interface RuleInput {
  /** Evaluation time, epoch seconds. */
  nowT: number;
  site: SiteConfig;
  /** Recent samples (at least the last two days is enough for every rule). */
  series: SeriesMap;
  /** Pump runs already detected (e.g. stored by ingest); when absent they are found from the series. */
  pumpRuns?: readonly PumpRun[];
  /** Latest reading time per gateway id (null when it never reported). */
  lastReadingT?: Readonly<Record<string, number | null>>;
  openAlerts: readonly OpenAlert[];
}

/** Units an evidence value can carry (SI; screens convert with units.ts). */
export type EvidenceUnit =
  | 'V'
  | 'A'
  | 'W'
  | 'Cel'
  | 'm'
  | 'm3'
  | 'm3/s'
  | 'Pa'
  | 's'
  | 'fraction'
  | 'count'
  | 'days'
  | 'epoch_s'
  | null;

/** One fact shown beside an alert: a value, its unit, and when it was seen. */
export interface EvidenceItem {
  label: string;
  value: number | string | boolean | null;
  unit: EvidenceUnit;
  t?: number;
}

/** The evidence an e-mail and a screen can show. */
export interface Evidence {
  /** The window of data looked at, epoch seconds. */
  fromT: number;
  toT: number;
  /** Observed values. */
  observed: EvidenceItem[];
  /** Thresholds the observation was compared with. */
  thresholds: EvidenceItem[];
}

/** What an evaluator decided for one subject. */
export interface RuleDecision {
  kind: AlertKind;
  subject: string;
  /**
   * 'open': raise a new alert; 'keep': an open alert still holds (severity may change);
   * 'clear': an open alert has recovered past its hysteresis; 'none': nothing to do.
   */
  action: 'open' | 'keep' | 'clear' | 'none';
  /** Severity for open and keep; null otherwise. */
  severity: AlertSeverity | null;
  /** One line for e-mail subjects and lists. */
  summary: string;
  evidence: Evidence | null;
}
