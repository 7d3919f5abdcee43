/**
 * Faults from the command line and from config files. On the command line a fault is
 *   <site>:<kind>[@<start>][+<duration>][=<target>]
 * where start is an ISO time or an offset from now (`-2d`, `-90m`, `+1h`; default now) and
 * duration a span (`36h`, `10d`; default 1d). Examples:
 *   red-mesa-ranch:float_stuck_closed@-1d+10d=north-float
 *   owl-creek-cabin:parasitic_load@-3d+10d=8
 */
import { FAULT_KINDS, type FaultKind, type ScheduledFault, isFaultKind } from './fault-kinds.js';

const UNIT_SECONDS: Record<string, number> = { s: 1, m: 60, h: 3600, d: 86_400 };

/** Parses a span such as `90s`, `15m`, `36h`, `10d` (or a plain number of seconds). */
export function parseSpanSeconds(text: string): number {
  const m = /^(\d+(?:\.\d+)?)([smhd]?)$/.exec(text.trim());
  if (!m)
    throw new Error(`"${text}" is not a time span: use a number with s, m, h or d (e.g. 36h)`);
  return Number(m[1]) * (UNIT_SECONDS[m[2] || 's'] as number);
}

/** Parses an instant: an ISO time, or an offset from `nowT` such as `-2d` or `+1h`. */
export function parseInstant(text: string, nowT: number): number {
  const trimmed = text.trim();
  if (trimmed === 'now') return nowT;
  const offset = /^([+-])(.+)$/.exec(trimmed);
  if (offset) {
    const span = parseSpanSeconds(offset[2] as string);
    return offset[1] === '-' ? nowT - span : nowT + span;
  }
  const ms = Date.parse(trimmed);
  if (Number.isNaN(ms)) {
    throw new Error(`"${text}" is not a time: use an ISO time or an offset like -2d or +3h`);
  }
  return ms / 1000;
}

/** Parses one `--fault` flag. */
export function parseFaultFlag(
  text: string,
  nowT: number,
  siteKeys: readonly string[],
): ScheduledFault {
  const m = /^([^:]+):([a-z_]+)(?:@([^+=]+|[+-][^+=]+))?(?:\+([^=]+))?(?:=(.+))?$/.exec(
    text.trim(),
  );
  if (!m) {
    throw new Error(
      `--fault "${text}": expected <site>:<kind>[@<start>][+<duration>][=<target>], e.g. red-mesa-ranch:float_stuck_closed@-1d+10d`,
    );
  }
  const [, siteKey, kind, start, duration, target] = m as unknown as [
    string,
    string,
    string,
    string | undefined,
    string | undefined,
    string | undefined,
  ];
  return checkedFault(
    { siteKey, kind, start, duration, target },
    nowT,
    siteKeys,
    `--fault "${text}"`,
  );
}

/** A fault as written in a config file. */
export interface FaultEntry {
  site: string;
  kind: string;
  start?: string;
  duration?: string;
  target?: string;
}

export function faultFromEntry(
  entry: FaultEntry,
  nowT: number,
  siteKeys: readonly string[],
  where: string,
): ScheduledFault {
  return checkedFault(
    {
      siteKey: entry.site,
      kind: entry.kind,
      start: entry.start,
      duration: entry.duration,
      target: entry.target,
    },
    nowT,
    siteKeys,
    where,
  );
}

function checkedFault(
  f: { siteKey: string; kind: string; start?: string; duration?: string; target?: string },
  nowT: number,
  siteKeys: readonly string[],
  where: string,
): ScheduledFault {
  if (!siteKeys.includes(f.siteKey)) {
    throw new Error(`${where}: no site "${f.siteKey}" (sites: ${siteKeys.join(', ')})`);
  }
  if (!isFaultKind(f.kind)) {
    throw new Error(`${where}: "${f.kind}" is not a fault (faults: ${FAULT_KINDS.join(', ')})`);
  }
  let startT: number;
  let span: number;
  try {
    startT = f.start ? parseInstant(f.start, nowT) : nowT;
    span = f.duration ? parseSpanSeconds(f.duration) : 86_400;
  } catch (error) {
    throw new Error(`${where}: ${(error as Error).message}`);
  }
  if (f.kind === 'parasitic_load' && f.target !== undefined && !(Number(f.target) > 0)) {
    throw new Error(
      `${where}: a parasitic load's target is its current in amps, got "${f.target}"`,
    );
  }
  const fault: ScheduledFault = {
    siteKey: f.siteKey,
    kind: f.kind as FaultKind,
    startT,
    endT: startT + span,
  };
  if (f.target !== undefined) fault.target = f.target;
  return fault;
}

/** The demo scenario's faults (`startDaysAgo` before `nowT`). */
export function demoFaults(
  sites: readonly {
    key: string;
    faults?: { kind: string; startDaysAgo: number; durationHours: number; target?: string }[];
  }[],
  nowT: number,
): ScheduledFault[] {
  const out: ScheduledFault[] = [];
  for (const site of sites) {
    for (const f of site.faults ?? []) {
      if (!isFaultKind(f.kind)) throw new Error(`demo site ${site.key}: unknown fault "${f.kind}"`);
      const startT = nowT - f.startDaysAgo * 86_400;
      const fault: ScheduledFault = {
        siteKey: site.key,
        kind: f.kind,
        startT,
        endT: startT + f.durationHours * 3600,
      };
      if (f.target !== undefined) fault.target = f.target;
      out.push(fault);
    }
  }
  return out;
}
