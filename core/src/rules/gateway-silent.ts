/**
 * gateway_silent — "Gateway silent": no data from a gateway for several reporting intervals.
 */
import { formatDurationSeconds } from '../units.js';
import type { RuleDecision, RuleInput } from './types.js';
import type { RuleParamsOverrides } from './defaults.js';
import { ruleParamsFor } from './defaults.js';
import { decide } from './support.js';

/** Latest sample time over every series of the input, or null. */
export function latestSampleTime(input: RuleInput): number | null {
  let latest: number | null = null;
  for (const samples of Object.values(input.series)) {
    for (const s of samples)
      if (Number.isFinite(s.t) && (latest === null || s.t > latest)) latest = s.t;
  }
  return latest;
}

/**
 * Evaluates gateway_silent for every gateway (subject: the gateway id). The last reading time
 * comes from `lastReadingT`, or, for a site with one gateway, from the newest sample.
 */
export function evaluateGatewaySilent(
  input: RuleInput,
  overrides?: RuleParamsOverrides,
): RuleDecision[] {
  const gateways = input.site.gateways;
  return gateways.map((gateway) => {
    const p = ruleParamsFor('gateway_silent', input.site, overrides, gateway.id);
    const interval = gateway.reportingIntervalSeconds ?? p.defaultReportingIntervalSeconds;
    const fromMap = input.lastReadingT?.[gateway.id];
    const last =
      fromMap !== undefined ? fromMap : gateways.length === 1 ? latestSampleTime(input) : null;
    if (last === null) {
      return decide(input, 'gateway_silent', gateway.id, {
        insufficient: `gateway ${gateway.id} has not reported yet`,
      });
    }
    const silentFor = Math.max(input.nowT - last, 0);
    const limit = interval * p.silentAfterIntervals;
    return decide(input, 'gateway_silent', gateway.id, {
      triggered: silentFor > limit,
      recovered: silentFor <= interval * p.clearWithinIntervals,
      severity: silentFor >= p.actAfterSeconds ? 'act' : 'watch',
      faultSummary: `No data from gateway ${gateway.id} for ${formatDurationSeconds(silentFor)}`,
      recoveredSummary: `Gateway ${gateway.id} is reporting`,
      evidence: {
        fromT: last,
        toT: input.nowT,
        observed: [
          { label: 'Last reading', value: last, unit: 'epoch_s' },
          { label: 'Silent for', value: silentFor, unit: 's' },
        ],
        thresholds: [
          { label: 'Reporting interval', value: interval, unit: 's' },
          { label: 'Silent after', value: limit, unit: 's' },
          { label: 'Act after', value: p.actAfterSeconds, unit: 's' },
        ],
      },
    });
  });
}
