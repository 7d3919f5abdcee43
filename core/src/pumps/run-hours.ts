/**
 * Run-hours since the last rebuild, and whether a rebuild is due.
 */
import { SECONDS_PER_HOUR } from '../units.js';
import type { PumpRun } from './pump-runs.js';

/** Hours run by the pump in [sinceT, untilT], counting only the overlap of each run. */
export function runHoursBetween(runs: readonly PumpRun[], sinceT: number, untilT: number): number {
  let seconds = 0;
  for (const run of runs) {
    const from = Math.max(run.startT, sinceT);
    const to = Math.min(run.endT, untilT);
    if (to > from) seconds += to - from;
  }
  return seconds / SECONDS_PER_HOUR;
}

/** Rebuild status of a pump. */
export interface RebuildStatus {
  runHours: number;
  /** Hours left before the interval is reached (negative when overdue), or null without an interval. */
  hoursRemaining: number | null;
  due: boolean;
}

/**
 * Run-hours since the last rebuild and how many remain of the rebuild interval.
 * `hoursAtRebuild` adds hours already on the pump before the runs were recorded.
 */
export function rebuildStatus(
  runs: readonly PumpRun[],
  lastRebuildT: number,
  nowT: number,
  rebuildIntervalHours: number | null,
  hoursAtRebuild = 0,
): RebuildStatus {
  const runHours = hoursAtRebuild + runHoursBetween(runs, lastRebuildT, nowT);
  if (rebuildIntervalHours === null || !(rebuildIntervalHours > 0)) {
    return { runHours, hoursRemaining: null, due: false };
  }
  const hoursRemaining = rebuildIntervalHours - runHours;
  return { runHours, hoursRemaining, due: hoursRemaining <= 0 };
}
