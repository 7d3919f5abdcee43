/**
 * short_cycling — "Short cycling": more starts than the motor allows (per hour, per day, or in a
 * burst), or runs shorter than a minute (common practice: at least a minute per run; small
 * submersible motors about 300 starts a day at most).
 */
import { countStarts, maxStartsInWindow } from '../pumps/pump-runs.js';
import { SECONDS_PER_DAY, SECONDS_PER_HOUR } from '../units.js';
import type { RuleDecision, RuleInput, RulePumpConfig } from './types.js';
import type { RuleParamsOverrides } from './defaults.js';
import { ruleParamsFor } from './defaults.js';
import { decide, minutes } from './support.js';
import { pumpRunsFor } from './pump-data.js';

/** Evaluates short_cycling for every pump (subject: the pump key). */
export function evaluateShortCycling(
  input: RuleInput,
  overrides?: RuleParamsOverrides,
): RuleDecision[] {
  return input.site.pumps.map((pump) => evaluatePump(input, pump, overrides));
}

function evaluatePump(
  input: RuleInput,
  pump: RulePumpConfig,
  overrides?: RuleParamsOverrides,
): RuleDecision {
  const p = ruleParamsFor('short_cycling', input.site, overrides, pump.key);
  const now = input.nowT;
  const runs = pumpRunsFor(input, pump).filter((r) => r.startT <= now);
  const lastHour = runs.filter((r) => r.startT >= now - SECONDS_PER_HOUR);
  const startsHour = countStarts(runs, now - SECONDS_PER_HOUR, now + 1);
  const startsDay = countStarts(runs, now - SECONDS_PER_DAY, now + 1);
  const burst = maxStartsInWindow(lastHour, p.burstWindowSeconds);
  const shortRuns = lastHour.filter(
    (r) => !r.stillRunning && !r.spansGap && r.durationSeconds < p.minRunSeconds,
  );
  const reasons: string[] = [];
  if (burst.starts > p.maxStartsPerBurst)
    reasons.push(`${burst.starts} starts in ${minutes(p.burstWindowSeconds)}`);
  if (startsHour > p.maxStartsPerHour) reasons.push(`${startsHour} starts in the last hour`);
  if (startsDay > p.maxStartsPerDay) reasons.push(`${startsDay} starts in the last day`);
  if (shortRuns.length >= p.shortRunsPerHourToAlert) {
    reasons.push(`${shortRuns.length} runs shorter than ${p.minRunSeconds} s in the last hour`);
  }
  const triggered = reasons.length > 0;
  const recovered =
    burst.starts <= Math.floor(p.maxStartsPerBurst / 2) &&
    startsHour <= Math.floor(p.maxStartsPerHour / 2) &&
    startsDay <= p.maxStartsPerDay &&
    shortRuns.length === 0;
  return decide(input, 'short_cycling', pump.key, {
    triggered,
    recovered,
    severity: burst.starts > p.maxStartsPerBurst || startsDay > p.maxStartsPerDay ? 'act' : 'watch',
    faultSummary: `Pump ${pump.key} is short cycling: ${reasons.join(', ')}`,
    recoveredSummary: `Pump ${pump.key} starts ${startsHour} times an hour`,
    evidence: {
      fromT: now - SECONDS_PER_DAY,
      toT: now,
      observed: [
        { label: 'Starts in the last hour', value: startsHour, unit: 'count' },
        { label: 'Starts in the last day', value: startsDay, unit: 'count' },
        {
          label: 'Most starts in a burst window',
          value: burst.starts,
          unit: 'count',
          ...(burst.fromT !== null ? { t: burst.fromT } : {}),
        },
        { label: 'Short runs in the last hour', value: shortRuns.length, unit: 'count' },
        {
          label: 'Shortest run in the last hour',
          value: lastHour.length > 0 ? Math.min(...lastHour.map((r) => r.durationSeconds)) : null,
          unit: 's',
        },
      ],
      thresholds: [
        { label: 'Most starts per hour', value: p.maxStartsPerHour, unit: 'count' },
        { label: 'Most starts per day', value: p.maxStartsPerDay, unit: 'count' },
        { label: 'Most starts in a burst window', value: p.maxStartsPerBurst, unit: 'count' },
        { label: 'Burst window', value: p.burstWindowSeconds, unit: 's' },
        { label: 'Shortest healthy run', value: p.minRunSeconds, unit: 's' },
      ],
    },
  });
}
