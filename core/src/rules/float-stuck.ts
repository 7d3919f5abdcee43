/**
 * float_stuck — "Float not switching": the float switch's logic checked against the tank level.
 * Fault 1: the pump keeps running while the tank is full (the float never opened). Fault 2: the
 * tank is low and the float never calls for water.
 */
import { measurementName } from '../telemetry/measurements.js';
import { tankVolumeFromLevel } from '../tanks/tank-volume.js';
import { type Sample, sampleAtOrBefore } from '../series.js';
import type { FloatSwitchConfig, RuleDecision, RuleInput } from './types.js';
import type { RuleParamsOverrides } from './defaults.js';
import { ruleParamsFor } from './defaults.js';
import { booleanSeries, decide, minutes, numericSeries, percent } from './support.js';
import { pumpStates, runningThroughout } from './pump-data.js';

/** Evaluates float_stuck for every float switch (subject: the switch key). */
export function evaluateFloatStuck(
  input: RuleInput,
  overrides?: RuleParamsOverrides,
): RuleDecision[] {
  return input.site.floatSwitches.map((sw) => evaluateSwitch(input, sw, overrides));
}

function evaluateSwitch(
  input: RuleInput,
  sw: FloatSwitchConfig,
  overrides?: RuleParamsOverrides,
): RuleDecision {
  const p = ruleParamsFor('float_stuck', input.site, overrides, sw.key);
  const tank = input.site.tanks.find((t) => t.key === sw.tankKey);
  if (!tank)
    return decide(input, 'float_stuck', sw.key, {
      insufficient: `tank ${sw.tankKey} is not configured`,
    });
  const levels = numericSeries(input, measurementName('tank/<tank>/level', tank.key));
  const fractions: Sample[] = [];
  for (const s of levels) {
    const r = tankVolumeFromLevel(tank, s.v);
    if (r.ok) fractions.push({ t: s.t, v: r.fractionFull });
  }
  const floatStates = booleanSeries(input, measurementName('float/<switch>/closed', sw.key));
  const calling = floatStates.map((s) => ({ t: s.t, v: sw.logic === 'closed_calls' ? s.v : !s.v }));
  const pump = sw.pumpKey ? (input.site.pumps.find((x) => x.key === sw.pumpKey) ?? null) : null;

  const window = (hold: number) =>
    fractions.filter((s) => s.t >= input.nowT - hold && s.t <= input.nowT);
  const covered = (samples: Sample[], hold: number) =>
    samples.length >= 2 && (samples[0] as Sample).t <= input.nowT - 0.8 * hold;
  const recent = window(p.holdSeconds);
  const latest = fractions[fractions.length - 1];
  if (!latest || !covered(recent, p.holdSeconds)) {
    return decide(input, 'float_stuck', sw.key, {
      insufficient: 'not enough recent tank level data',
    });
  }
  const allFull = recent.every((s) => s.v >= p.fullFraction);
  const allLow = recent.every((s) => s.v <= p.lowFraction);
  const pumpRunning = pump
    ? runningThroughout(input, pump, input.nowT - p.holdSeconds, input.nowT)
    : false;
  const floatCallsInWindow = calling.filter((s) => s.t >= input.nowT - p.holdSeconds);
  const callingBefore = [...calling].reverse().find((s) => s.t <= input.nowT - p.holdSeconds);
  const neverCalled =
    calling.length > 0 &&
    (callingBefore ? !callingBefore.v : true) &&
    floatCallsInWindow.every((s) => !s.v);

  const runsAgainstFull = allFull && pumpRunning;
  const lowWithoutCall = allLow && neverCalled;

  // Healthy at every level sample of the clear window: never full while running, never low
  // without a call. Opening needs the fault to hold; clearing needs health to hold.
  const runningStates = pump ? pumpStates(input, pump) : [];
  const clearWindow = window(p.clearHoldSeconds);
  const healthyAt = (s: Sample) => {
    const runningNow = sampleAtOrBefore(runningStates, s.t)?.v ?? false;
    const callingNow = sampleAtOrBefore(calling, s.t)?.v ?? true;
    return !(s.v >= p.fullFraction && runningNow) && !(s.v <= p.lowFraction && !callingNow);
  };
  const recovered = covered(clearWindow, p.clearHoldSeconds) && clearWindow.every(healthyAt);

  const faultSummary = runsAgainstFull
    ? `Pump ${pump?.key ?? ''} has run for over ${minutes(p.holdSeconds)} with tank ${tank.key} ${percent(latest.v)} full: float ${sw.key} is not stopping it`
    : `Tank ${tank.key} is ${percent(latest.v)} full and float ${sw.key} has not called for water in ${minutes(p.holdSeconds)}`;
  const latestCall = calling[calling.length - 1];
  return decide(input, 'float_stuck', sw.key, {
    triggered: runsAgainstFull || lowWithoutCall,
    recovered,
    severity: 'act',
    faultSummary,
    recoveredSummary: `Float ${sw.key} is switching with the tank level`,
    evidence: {
      fromT: input.nowT - p.holdSeconds,
      toT: input.nowT,
      observed: [
        { label: 'Tank full', value: latest.v, unit: 'fraction', t: latest.t },
        { label: 'Lowest in window', value: Math.min(...recent.map((s) => s.v)), unit: 'fraction' },
        { label: 'Pump running throughout', value: pumpRunning, unit: null },
        {
          label: 'Float calling for water',
          value: latestCall ? latestCall.v : null,
          unit: null,
          ...(latestCall ? { t: latestCall.t } : {}),
        },
      ],
      thresholds: [
        { label: 'Full at', value: p.fullFraction, unit: 'fraction' },
        { label: 'Low at', value: p.lowFraction, unit: 'fraction' },
        { label: 'Held for', value: p.holdSeconds, unit: 's' },
      ],
    },
  });
}
