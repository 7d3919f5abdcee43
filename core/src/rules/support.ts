/**
 * Helpers shared by the rule evaluators: typed access to the series, the open-alert lookup, and
 * the hysteresis step that turns a trigger/recovery observation into a decision.
 */
import type { Sample } from '../series.js';
import type {
  AlertKind,
  AlertSeverity,
  Evidence,
  OpenAlert,
  RuleDecision,
  RuleInput,
} from './types.js';

/** Numeric samples of a channel, sorted by time. */
export function numericSeries(input: RuleInput, name: string): Sample[] {
  const samples = input.series[name] ?? [];
  return samples
    .filter(
      (s): s is Sample => typeof s.v === 'number' && Number.isFinite(s.v) && Number.isFinite(s.t),
    )
    .sort((a, b) => a.t - b.t);
}

/** Boolean samples of a channel, sorted by time. */
export function booleanSeries(input: RuleInput, name: string): Sample<boolean>[] {
  const samples = input.series[name] ?? [];
  return samples
    .filter((s): s is Sample<boolean> => typeof s.v === 'boolean' && Number.isFinite(s.t))
    .sort((a, b) => a.t - b.t);
}

/** String samples of a channel, sorted by time. */
export function stringSeries(input: RuleInput, name: string): Sample<string>[] {
  const samples = input.series[name] ?? [];
  return samples
    .filter((s): s is Sample<string> => typeof s.v === 'string' && Number.isFinite(s.t))
    .sort((a, b) => a.t - b.t);
}

/** The open alert of a kind for a subject, if any. */
export function openAlertFor(input: RuleInput, kind: AlertKind, subject: string): OpenAlert | null {
  return input.openAlerts.find((a) => a.kind === kind && a.subject === subject) ?? null;
}

/** What an evaluator observed for one subject. */
export interface Observation {
  /** The fault condition holds (long enough). */
  triggered: boolean;
  /** The healthy condition holds past the hysteresis band (long enough). */
  recovered: boolean;
  severity: AlertSeverity;
  /** Summary when the fault holds. */
  faultSummary: string;
  /** Summary when recovered. */
  recoveredSummary: string;
  evidence: Evidence | null;
}

/**
 * Hysteresis: open when triggered and not open; clear when open and recovered; keep when open
 * otherwise (including when the data are insufficient); none when closed and not triggered.
 */
export function decide(
  input: RuleInput,
  kind: AlertKind,
  subject: string,
  observation: Observation | { insufficient: string },
): RuleDecision {
  const open = openAlertFor(input, kind, subject);
  if ('insufficient' in observation) {
    return open
      ? {
          kind,
          subject,
          action: 'keep',
          severity: open.severity,
          summary: observation.insufficient,
          evidence: null,
        }
      : {
          kind,
          subject,
          action: 'none',
          severity: null,
          summary: observation.insufficient,
          evidence: null,
        };
  }
  if (!open) {
    return observation.triggered
      ? {
          kind,
          subject,
          action: 'open',
          severity: observation.severity,
          summary: observation.faultSummary,
          evidence: observation.evidence,
        }
      : {
          kind,
          subject,
          action: 'none',
          severity: null,
          summary: observation.recoveredSummary,
          evidence: observation.evidence,
        };
  }
  if (observation.recovered && !observation.triggered) {
    return {
      kind,
      subject,
      action: 'clear',
      severity: null,
      summary: observation.recoveredSummary,
      evidence: observation.evidence,
    };
  }
  return {
    kind,
    subject,
    action: 'keep',
    severity: observation.triggered ? observation.severity : open.severity,
    summary: observation.triggered
      ? observation.faultSummary
      : `${observation.faultSummary} (recovering)`,
    evidence: observation.evidence,
  };
}

/** Rounds for summaries: fixed decimals, no trailing noise. */
export function fixed(value: number, digits: number): string {
  return value.toFixed(digits);
}

/** Percent text of a fraction, e.g. 0.4 → '40 %'. */
export function percent(fraction: number): string {
  return `${Math.round(fraction * 100)} %`;
}

/** Minutes text of seconds. */
export function minutes(seconds: number): string {
  return `${Math.round(seconds / 60)} min`;
}
