/**
 * The faults the simulator can inject, what each does to the site or its gateway, and which
 * alert of the product should notice it.
 */

export const FAULT_KINDS = [
  'float_stuck_closed',
  'float_stuck_open',
  'well_drawn_down',
  'battery_aged',
  'parasitic_load',
  'charge_controller_failed',
  'bladder_lost_precharge',
  'gateway_offline',
  'bad_payloads',
] as const;

export type FaultKind = (typeof FAULT_KINDS)[number];

export interface FaultDescription {
  /** What happens, in a line for `--help`. */
  effect: string;
  /** The alert key that should notice it (product brief, "Alerts"), or null. */
  alert: string | null;
  /** What `target` names for this fault, if anything. */
  target?: string;
}

export const FAULTS: Readonly<Record<FaultKind, FaultDescription>> = {
  float_stuck_closed: {
    effect: 'the float never opens: its pump keeps running with the tank full (it overflows)',
    alert: 'float_stuck',
    target: 'float switch key (default: the first float)',
  },
  float_stuck_open: {
    effect: 'the float never closes: its pump never starts and the tank runs down',
    alert: 'float_stuck',
    target: 'float switch key (default: the first float)',
  },
  well_drawn_down: {
    effect: 'the water stands just above the intake: the pump runs dry (low current, no tank rise)',
    alert: 'dry_run',
  },
  battery_aged: {
    effect:
      'the bank keeps 35 % of its capacity, at 4 × the resistance and with a self-discharge: deep overnight sag',
    alert: 'overnight_sag',
  },
  parasitic_load: {
    effect: 'an extra load on the battery bus day and night (default 5 % of capacity in amps)',
    alert: 'overnight_sag',
    target: 'amps, e.g. "8" (default 5 % of the bank capacity)',
  },
  charge_controller_failed: {
    effect: 'the charge controller stops charging: no charge current in full sun, stage off',
    alert: 'no_charge',
  },
  bladder_lost_precharge: {
    effect: 'the pressure tank loses its air charge: the booster short-cycles while taps run',
    alert: 'short_cycling',
  },
  gateway_offline: {
    effect: 'the gateway loses its link: nothing arrives; readings are kept and sent afterwards',
    alert: 'gateway_silent',
  },
  bad_payloads: {
    effect:
      'every ten minutes a bad pack: not JSON, wrong units, NaN, out of range or future times',
    alert: null,
  },
};

export function isFaultKind(value: string): value is FaultKind {
  return (FAULT_KINDS as readonly string[]).includes(value);
}

/** A fault at one site over a time window (epoch seconds). */
export interface ScheduledFault {
  siteKey: string;
  kind: FaultKind;
  startT: number;
  endT: number;
  /** Float key, or amps for a parasitic load. */
  target?: string;
}

/** The first fault of a kind active at an instant, if any. */
export function activeFault(
  faults: readonly ScheduledFault[],
  kind: FaultKind,
  t: number,
): ScheduledFault | undefined {
  for (const f of faults) if (f.kind === kind && f.startT <= t && t < f.endT) return f;
  return undefined;
}
