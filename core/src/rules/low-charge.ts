/**
 * low_charge — "Battery low": the estimated state of charge stays under the site's floor for a
 * while. The estimate is the battery module's (rest voltage anchored, amp-hour counted); an
 * indeterminate estimate (a LiFePO4 bank resting on its plateau) never opens the alert.
 */
import { estimateStateOfCharge } from '../battery/amp-hour-counter.js';
import type { ControllerStage } from '../telemetry/measurements.js';
import { isControllerStage } from '../telemetry/measurements.js';
import { overnightWindow, preDawnWindow } from '../sun/daylight.js';
import type { RuleDecision, RuleInput } from './types.js';
import type { RuleParamsOverrides } from './defaults.js';
import { ruleParamsFor } from './defaults.js';
import { decide, numericSeries, percent, stringSeries } from './support.js';

/** Evaluates low_charge for the site's battery bank (subject ''). */
export function evaluateLowCharge(
  input: RuleInput,
  overrides?: RuleParamsOverrides,
): RuleDecision[] {
  const bank = input.site.battery;
  if (!bank) return [];
  const p = ruleParamsFor('low_charge', input.site, overrides);
  const voltages = numericSeries(input, 'battery/voltage');
  const currents = numericSeries(input, 'battery/current');
  const temperatures = numericSeries(input, 'battery/temperature');
  const stages = stringSeries(input, 'controller/stage').filter(
    (s): s is { t: number; v: ControllerStage } => isControllerStage(s.v),
  );
  const latestVoltage = voltages[voltages.length - 1];
  if (!latestVoltage || latestVoltage.t < input.nowT - p.holdSeconds) {
    return [decide(input, 'low_charge', '', { insufficient: 'no recent battery voltage' })];
  }
  const night = overnightWindow(input.nowT, {
    ...input.site.location,
    timeZone: input.site.timeZone,
  });
  const temperature = temperatures[temperatures.length - 1]?.v;
  const estimateAt = (atT: number) =>
    estimateStateOfCharge({
      bank,
      voltages,
      currents,
      stages,
      atT,
      preDawn: night && night.endT <= atT ? preDawnWindow(night) : null,
      ...(temperature !== undefined ? { temperatureCelsius: temperature } : {}),
    });
  const checkTimes = [input.nowT - p.holdSeconds, input.nowT - p.holdSeconds / 2, input.nowT];
  const estimates = checkTimes.map(estimateAt);
  const now = estimates[estimates.length - 1];
  if (!now || now.socFraction === null) {
    return [
      decide(input, 'low_charge', '', {
        insufficient: now?.note || 'state of charge cannot be told from the data',
      }),
    ];
  }
  const allBelow = estimates.every(
    (e) => e.socFraction !== null && e.socFraction < p.floorFraction,
  );
  const recovered = now.socFraction > p.clearAboveFraction;
  return [
    decide(input, 'low_charge', '', {
      triggered: allBelow,
      recovered,
      severity: now.socFraction < p.actBelowFraction ? 'act' : 'watch',
      faultSummary: `Battery about ${percent(now.socFraction)} charged, under the ${percent(p.floorFraction)} floor`,
      recoveredSummary: `Battery about ${percent(now.socFraction)} charged`,
      evidence: {
        fromT: checkTimes[0] as number,
        toT: input.nowT,
        observed: [
          ...estimates.map((e, i) => ({
            label: 'Estimated state of charge',
            value: e.socFraction,
            unit: 'fraction' as const,
            t: checkTimes[i] as number,
          })),
          { label: 'Estimate band, low', value: now.lowFraction, unit: 'fraction' },
          { label: 'Estimate band, high', value: now.highFraction, unit: 'fraction' },
          { label: 'Battery voltage', value: latestVoltage.v, unit: 'V', t: latestVoltage.t },
          { label: 'How estimated', value: now.note || now.method, unit: null },
        ],
        thresholds: [
          { label: 'Floor', value: p.floorFraction, unit: 'fraction' },
          { label: 'Clears above', value: p.clearAboveFraction, unit: 'fraction' },
          { label: 'Act below', value: p.actBelowFraction, unit: 'fraction' },
          { label: 'Held for', value: p.holdSeconds, unit: 's' },
        ],
      },
    }),
  ];
}
