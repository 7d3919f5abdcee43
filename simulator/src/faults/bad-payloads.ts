/**
 * The bad-payload fault: packs a broken gateway firmware might send. Each one is built by hand,
 * not by core's serialiser (which refuses to write NaN or a bad name), and all but the
 * unparseable ones carry one good record beside the bad one, so a test can see that ingest keeps
 * the good record and refuses only the bad.
 */
import { type OutgoingReading, measurementSpec, parseMeasurementName } from '@wellkept/core';

export const BAD_PAYLOAD_KINDS = [
  'not_json',
  'wrong_unit',
  'nan_value',
  'out_of_range',
  'future_time',
] as const;
export type BadPayloadKind = (typeof BAD_PAYLOAD_KINDS)[number];

/** How often the fault sends a bad pack, seconds of simulated time. */
export const BAD_PAYLOAD_INTERVAL_SECONDS = 600;

/**
 * A bad pack of the given kind. `good` is a real reading of the site to travel with it; `nowT`
 * the wall-clock time (future times are counted from the receiver's clock).
 */
export function badPayload(
  kind: BadPayloadKind,
  gatewayId: string,
  good: OutgoingReading,
  tankKey: string | null,
  nowT: number,
): string {
  const bn = `urn:dev:wellkept:${gatewayId}:`;
  const parsed = parseMeasurementName(good.name);
  const unit = good.unit ?? (parsed ? measurementSpec(parsed.pattern).unit : null);
  const goodRecord = { n: good.name, ...(unit ? { u: unit } : {}), ...valueField(good) };
  switch (kind) {
    case 'not_json':
      // Cut off mid-record, as when a buffer overflows.
      return `[{"bn":"${bn}","bt":${good.t},"n":"battery/voltage","u":"V","v":2`;
    case 'nan_value':
      // A C printf of a failed sensor read: NaN is not JSON at all.
      return `[{"bn":"${bn}","bt":${good.t},"n":"battery/voltage","u":"V","v":NaN}]`;
    case 'wrong_unit':
      return JSON.stringify([
        { bn, bt: good.t, ...goodRecord },
        tankKey
          ? { n: `tank/${tankKey}/level`, u: 'cm', v: 142 }
          : { n: 'battery/temperature', u: 'degF', v: 71 },
      ]);
    case 'out_of_range':
      return JSON.stringify([
        { bn, bt: good.t, ...goodRecord },
        { n: 'battery/voltage', u: 'V', v: 912 },
      ]);
    case 'future_time':
      return JSON.stringify([
        { bn, bt: good.t, ...goodRecord },
        { n: 'battery/voltage', u: 'V', v: 26.1, t: nowT + 86_400 - good.t },
      ]);
  }
}

function valueField(r: OutgoingReading): { v: number } | { vb: boolean } | { vs: string } {
  if (typeof r.value === 'number') return { v: r.value };
  if (typeof r.value === 'boolean') return { vb: r.value };
  return { vs: r.value };
}
