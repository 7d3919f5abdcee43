/**
 * overnight_sag — "Overnight sag": over the last complete night the battery voltage fell further
 * than the site's limit (from an hour after sunset, when the charge has settled, to dawn), or the
 * dawn voltage was under the floor. Judged once per night, after sunrise.
 */
import { cellsInSeries } from '../battery/state-of-charge.js';
import { overnightSummary } from '../battery/overnight.js';
import { overnightWindow } from '../sun/daylight.js';
import type { RuleDecision, RuleInput } from './types.js';
import type { RuleParamsOverrides } from './defaults.js';
import { ruleParamsFor } from './defaults.js';
import { decide, fixed, numericSeries } from './support.js';

/** Evaluates overnight_sag for the site's battery bank (subject ''). */
export function evaluateOvernightSag(
  input: RuleInput,
  overrides?: RuleParamsOverrides,
): RuleDecision[] {
  const bank = input.site.battery;
  if (!bank) return [];
  const p = ruleParamsFor('overnight_sag', input.site, overrides);
  const site = { ...input.site.location, timeZone: input.site.timeZone };
  let night = overnightWindow(input.nowT, site);
  if (night && night.endT > input.nowT) night = overnightWindow(night.startT - 60, site);
  if (!night)
    return [
      decide(input, 'overnight_sag', '', { insufficient: 'no complete night at this site yet' }),
    ];
  const settled = { startT: night.startT + p.settleSeconds, endT: night.endT };
  if (settled.startT >= settled.endT) {
    return [decide(input, 'overnight_sag', '', { insufficient: 'night too short to judge' })];
  }
  const voltages = numericSeries(input, 'battery/voltage');
  const currents = numericSeries(input, 'battery/current');
  const summary = overnightSummary(bank, voltages, currents.length > 0 ? currents : null, settled);
  if (!summary) {
    return [
      decide(input, 'overnight_sag', '', {
        insufficient: 'not enough battery voltage data over the night',
      }),
    ];
  }
  const cells = cellsInSeries(bank);
  const maxDrop = p.maxDropVoltsPerCell * cells;
  const dawnFloor = p.dawnFloorVoltsPerCell * cells;
  const tooMuchDrop = summary.dropVolts > maxDrop;
  const lowDawn = summary.dawnVolts < dawnFloor;
  const recovered =
    summary.dropVolts <= maxDrop * p.clearDropShare && summary.dawnVolts >= dawnFloor;
  const reasons: string[] = [];
  if (tooMuchDrop)
    reasons.push(`fell ${fixed(summary.dropVolts, 2)} V overnight (limit ${fixed(maxDrop, 2)} V)`);
  if (lowDawn)
    reasons.push(`was ${fixed(summary.dawnVolts, 2)} V at dawn (floor ${fixed(dawnFloor, 2)} V)`);
  return [
    decide(input, 'overnight_sag', '', {
      triggered: tooMuchDrop || lowDawn,
      recovered,
      severity: lowDawn || summary.dropVolts > 2 * maxDrop ? 'act' : 'watch',
      faultSummary: `Battery ${reasons.join(' and ') || `fell ${fixed(summary.dropVolts, 2)} V overnight`}`,
      recoveredSummary: `Battery fell ${fixed(summary.dropVolts, 2)} V overnight, within the ${fixed(maxDrop, 2)} V limit`,
      evidence: {
        fromT: settled.startT,
        toT: settled.endT,
        observed: [
          {
            label: 'Voltage an hour after sunset',
            value: summary.duskVolts,
            unit: 'V',
            t: settled.startT,
          },
          { label: 'Voltage at dawn', value: summary.dawnVolts, unit: 'V', t: settled.endT },
          { label: 'Overnight fall', value: summary.dropVolts, unit: 'V' },
          { label: 'Lowest voltage', value: summary.minVolts, unit: 'V', t: summary.minT },
          {
            label: 'Depth of discharge',
            value: summary.depthOfDischargeFraction,
            unit: 'fraction',
          },
          { label: 'Sunset', value: night.startT, unit: 'epoch_s' },
          { label: 'Sunrise', value: night.endT, unit: 'epoch_s' },
        ],
        thresholds: [
          { label: 'Largest normal fall', value: maxDrop, unit: 'V' },
          { label: 'Dawn floor', value: dawnFloor, unit: 'V' },
        ],
      },
    }),
  ];
}
