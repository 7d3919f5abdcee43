/**
 * no_charge — "Not charging": in daylight, with a clear-sky expectation for the site's arrays, the
 * measured charge stays near zero for hours. Clouds still give 10–30 % of the clear-sky figure, so
 * the default opening share (5 %) leaves a cloudy day alone; a full bank (controller in float or
 * absorption) is not a fault.
 */
import { measurementName } from '../telemetry/measurements.js';
import { clearSkyPvWattsOnGrid } from '../sun/pv-output.js';
import type { Sample } from '../series.js';
import { samplesAtOrBefore } from '../series.js';
import type { RuleDecision, RuleInput } from './types.js';
import type { RuleParamsOverrides } from './defaults.js';
import { ruleParamsFor } from './defaults.js';
import { decide, numericSeries, percent, stringSeries } from './support.js';

interface Point {
  t: number;
  measuredWatts: number;
  expectedWatts: number;
}

/** Measured charge power samples: the arrays' V × I when measured, else battery charge current × voltage. */
function measuredPower(input: RuleInput): Sample[] {
  const arrays = input.site.pvArrays;
  const perArray = arrays
    .map((a) => ({
      volts: numericSeries(input, measurementName('pv/<array>/voltage', a.key)),
      amps: numericSeries(input, measurementName('pv/<array>/current', a.key)),
    }))
    .filter((x) => x.amps.length > 0);
  if (perArray.length > 0) {
    const times = [...new Set(perArray.flatMap((x) => x.amps.map((s) => s.t)))].sort(
      (a, b) => a - b,
    );
    const atTimes = perArray.map((x) => ({
      amps: samplesAtOrBefore(x.amps, times),
      volts: samplesAtOrBefore(x.volts, times),
    }));
    return times.map((t, i) => ({
      t,
      v: atTimes.reduce((sum, x) => {
        const amps = x.amps[i]?.v ?? 0;
        const volts = x.volts[i]?.v ?? 0;
        return sum + Math.max(amps, 0) * Math.max(volts, 0);
      }, 0),
    }));
  }
  const current = numericSeries(input, 'battery/current');
  const volts = samplesAtOrBefore(
    numericSeries(input, 'battery/voltage'),
    current.map((s) => s.t),
  );
  return current.map((s, i) => ({
    t: s.t,
    v: Math.max(s.v, 0) * (volts[i]?.v ?? 0),
  }));
}

/** Evaluates no_charge for the site (subject ''). */
export function evaluateNoCharge(
  input: RuleInput,
  overrides?: RuleParamsOverrides,
): RuleDecision[] {
  const arrays = input.site.pvArrays;
  if (arrays.length === 0 || !input.site.battery) return [];
  const p = ruleParamsFor('no_charge', input.site, overrides);
  const rated = arrays.reduce((sum, a) => sum + a.ratedWatts, 0);
  const lookback = Math.max(p.actAfterSeconds, p.holdSeconds);
  // On a 5-minute grid: once per sample, the solar position dominated a busy fleet's CPU.
  const expected = clearSkyPvWattsOnGrid(arrays, input.site.location);
  const points: Point[] = measuredPower(input)
    .filter((s) => s.t >= input.nowT - lookback && s.t <= input.nowT)
    .map((s) => ({ t: s.t, measuredWatts: s.v, expectedWatts: expected(s.t) }))
    .filter((pt) => pt.expectedWatts >= p.minExpectedShareOfRated * rated);
  const stage = stringSeries(input, 'controller/stage');
  const latestStage = stage[stage.length - 1];
  const bankFull =
    latestStage !== undefined &&
    (latestStage.v === 'float' || latestStage.v === 'absorption') &&
    latestStage.t >= input.nowT - 3600;

  const inHold = points.filter((pt) => pt.t >= input.nowT - p.holdSeconds);
  const spans = (pts: Point[], seconds: number) =>
    pts.length >= 3 && (pts[pts.length - 1] as Point).t - (pts[0] as Point).t >= 0.75 * seconds;
  if (!spans(inHold, p.holdSeconds)) {
    return [
      decide(input, 'no_charge', '', {
        insufficient: 'not enough daylight data with a clear-sky expectation',
      }),
    ];
  }
  const low = (pt: Point) => pt.measuredWatts < p.maxMeasuredShareOfExpected * pt.expectedWatts;
  const triggered = !bankFull && inHold.every(low);
  // How long has it been low, within the look-back?
  let lowSince = input.nowT;
  for (let i = points.length - 1; i >= 0; i -= 1) {
    const pt = points[i] as Point;
    if (!low(pt)) break;
    lowSince = pt.t;
  }
  const lastHalfHour = points.filter((pt) => pt.t >= input.nowT - 1800);
  const share = (pts: Point[]) =>
    pts.reduce((sum, pt) => sum + pt.measuredWatts, 0) /
    Math.max(
      pts.reduce((sum, pt) => sum + pt.expectedWatts, 0),
      1e-9,
    );
  const recentShare = lastHalfHour.length > 0 ? share(lastHalfHour) : share(inHold);
  const recovered = bankFull || (lastHalfHour.length > 0 && recentShare >= p.clearShareOfExpected);
  return [
    decide(input, 'no_charge', '', {
      triggered,
      recovered,
      severity: input.nowT - lowSince >= p.actAfterSeconds ? 'act' : 'watch',
      faultSummary: `Not charging: ${percent(share(inHold))} of the clear-sky expectation for the last ${Math.round(p.holdSeconds / 3600)} h of daylight`,
      recoveredSummary: bankFull
        ? 'Battery is full: the controller is holding it'
        : `Charging at ${percent(recentShare)} of the clear-sky expectation`,
      evidence: {
        fromT: (inHold[0] as Point).t,
        toT: input.nowT,
        observed: [
          {
            label: 'Measured charge power (mean)',
            value: inHold.reduce((s, pt) => s + pt.measuredWatts, 0) / inHold.length,
            unit: 'W',
          },
          {
            label: 'Clear-sky expectation (mean)',
            value: inHold.reduce((s, pt) => s + pt.expectedWatts, 0) / inHold.length,
            unit: 'W',
          },
          { label: 'Share of expectation', value: share(inHold), unit: 'fraction' },
          {
            label: 'Controller stage',
            value: latestStage?.v ?? null,
            unit: null,
            ...(latestStage ? { t: latestStage.t } : {}),
          },
        ],
        thresholds: [
          { label: 'Opens below', value: p.maxMeasuredShareOfExpected, unit: 'fraction' },
          { label: 'Held for', value: p.holdSeconds, unit: 's' },
          { label: 'Arrays rated', value: rated, unit: 'W' },
        ],
      },
    }),
  ];
}
