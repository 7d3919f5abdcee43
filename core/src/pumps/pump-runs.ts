/**
 * Pump runs from switch states and motor current: when each run started and stopped, how long it
 * lasted, its mean current and energy, and how often the pump starts. A run that spans a data gap
 * is marked, not guessed.
 */
import { type Sample, sortSamples } from '../series.js';
import { SECONDS_PER_HOUR } from '../units.js';

/** A pump as configured at a site. */
export interface PumpConfig {
  /** Equipment key, the `<pump>` in `pump/<pump>/…`. */
  key: string;
  /** What the pump does, for wording. */
  role?: 'well' | 'booster' | 'transfer';
  /** Rated (nameplate) running current, amperes. */
  ratedCurrentAmps: number;
  /** Rated flow at the installed head, m³/s, when known. */
  ratedFlowCubicMetresPerSecond?: number | null;
  /** Supply voltage to the motor, volts (for energy when no voltage is measured). */
  supplyVolts?: number | null;
  /** Key of the tank this pump fills, or null. */
  fillsTankKey?: string | null;
  /** Motor rated power, watts, when known. */
  ratedWatts?: number | null;
  /** When the pump was last rebuilt or replaced, epoch seconds. */
  lastRebuildT?: number | null;
  /** Run-hours between rebuilds, when the maker gives one. */
  rebuildIntervalHours?: number | null;
}

/** One run of a pump. */
export interface PumpRun {
  pumpKey: string;
  startT: number;
  /** Last time the pump was seen running, or the stop time when seen stopped. */
  endT: number;
  durationSeconds: number;
  /** Mean of the current samples in the run, amperes, or null without current data. */
  meanCurrentAmps: number | null;
  /** Electrical energy, watt-hours (current × voltage integrated), or null when unknown. */
  energyWattHours: number | null;
  /** True when the data have a gap inside the run: start or stop may be off. */
  spansGap: boolean;
  /** True when the pump was still running at the last sample. */
  stillRunning: boolean;
}

/** Settings for run detection. */
export interface PumpRunOptions {
  /** Samples further apart than this are a gap, seconds. Default 900. */
  maxGapSeconds?: number;
  /** Without a running signal, current above this fraction of rated means running. Default 0.1. */
  runningCurrentFraction?: number;
}

/** Channels for one pump. */
export interface PumpChannels {
  /** `pump/<pump>/running` samples. */
  running?: readonly Sample<boolean>[];
  /** `pump/<pump>/current` samples, amperes. */
  current?: readonly Sample[];
  /** Voltage at the motor (or battery voltage for DC pumps), volts. */
  volts?: readonly Sample[];
}

/**
 * Finds the runs of a pump. The running switch state decides when the pump is on; without it,
 * current above a fraction of rated current does. A run starts at the first "on" sample after an
 * "off" one and ends at the next "off" sample; when the samples inside a run are further apart
 * than the gap limit, the run is flagged `spansGap`.
 */
export function detectPumpRuns(
  pump: PumpConfig,
  channels: PumpChannels,
  options: PumpRunOptions = {},
): PumpRun[] {
  const maxGap = options.maxGapSeconds ?? 900;
  const threshold = (options.runningCurrentFraction ?? 0.1) * pump.ratedCurrentAmps;
  const currents = sortSamples(channels.current ?? []).filter(
    (s) => Number.isFinite(s.v) && Number.isFinite(s.t),
  );
  const states: Sample<boolean>[] =
    channels.running && channels.running.length > 0
      ? sortSamples(channels.running).filter((s) => Number.isFinite(s.t))
      : currents.map((s) => ({ t: s.t, v: s.v > threshold }));
  const runs: PumpRun[] = [];
  let start: number | null = null;
  let lastOn: number | null = null;
  let previousT: number | null = null;
  let gap = false;
  const finish = (endT: number, stillRunning: boolean) => {
    if (start === null) return;
    runs.push(buildRun(pump, channels, currents, start, endT, gap, stillRunning));
    start = null;
    lastOn = null;
    gap = false;
  };
  for (const s of states) {
    if (start !== null && previousT !== null && s.t - previousT > maxGap) gap = true;
    if (s.v) {
      if (start === null) start = s.t;
      lastOn = s.t;
    } else if (start !== null) {
      finish(s.t, false);
    }
    previousT = s.t;
  }
  if (start !== null && lastOn !== null) finish(lastOn, true);
  return runs;
}

function buildRun(
  pump: PumpConfig,
  channels: PumpChannels,
  currents: Sample[],
  startT: number,
  endT: number,
  spansGap: boolean,
  stillRunning: boolean,
): PumpRun {
  const inRun = currents.filter((s) => s.t >= startT && s.t <= endT);
  const meanCurrent =
    inRun.length > 0 ? inRun.reduce((sum, s) => sum + s.v, 0) / inRun.length : null;
  const duration = Math.max(endT - startT, 0);
  let energy: number | null = null;
  const volts = sortSamples(channels.volts ?? []).filter((s) => Number.isFinite(s.v));
  if (meanCurrent !== null) {
    const inRunVolts = volts.filter((s) => s.t >= startT - 300 && s.t <= endT + 300);
    const meanVolts =
      inRunVolts.length > 0
        ? inRunVolts.reduce((sum, s) => sum + s.v, 0) / inRunVolts.length
        : (pump.supplyVolts ?? null);
    if (meanVolts !== null) energy = (meanCurrent * meanVolts * duration) / SECONDS_PER_HOUR;
  }
  return {
    pumpKey: pump.key,
    startT,
    endT,
    durationSeconds: duration,
    meanCurrentAmps: meanCurrent,
    energyWattHours: energy,
    spansGap,
    stillRunning,
  };
}

/** Number of runs that started in [fromT, toT). */
export function countStarts(runs: readonly PumpRun[], fromT: number, toT: number): number {
  return runs.filter((r) => r.startT >= fromT && r.startT < toT).length;
}

/**
 * The most starts inside any window of the given length (a sliding window over run starts),
 * with when that window began.
 */
export function maxStartsInWindow(
  runs: readonly PumpRun[],
  windowSeconds: number,
): { starts: number; fromT: number | null } {
  const starts = runs.map((r) => r.startT).sort((a, b) => a - b);
  let best = 0;
  let bestFrom: number | null = null;
  let j = 0;
  for (let i = 0; i < starts.length; i += 1) {
    const from = starts[i] as number;
    while (j < starts.length && (starts[j] as number) < from + windowSeconds) j += 1;
    if (j - i > best) {
      best = j - i;
      bestFrom = from;
    }
  }
  return { starts: best, fromT: bestFrom };
}
