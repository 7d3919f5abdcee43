/**
 * Readings → a compact SenML JSON pack (RFC 8428), as a Wellkept gateway sends it: the base
 * name on the first record, the base time set to the newest reading so every record's `t` is
 * zero or a small negative offset from it, and the most common unit as the base unit.
 */
import { type SenmlUnit, measurementSpec, parseMeasurementName } from './measurements.js';
import { isGatewayId, senmlBaseNameForGateway } from './senml-validate.js';

/** One reading to send. */
export interface OutgoingReading {
  /** Measurement name, e.g. 'tank/main/level'. */
  name: string;
  /** Time of the reading, seconds since the epoch. */
  t: number;
  value: number | boolean | string;
  /** SenML unit; defaults to the unit of the measurement table for numbers. */
  unit?: SenmlUnit | string;
}

/** A SenML record as written (JSON labels of RFC 8428 §5). */
export interface SenmlRecord {
  bn?: string;
  bt?: number;
  bu?: string;
  bver?: number;
  n?: string;
  u?: string;
  v?: number;
  vs?: string;
  vb?: boolean;
  t?: number;
}

/** Options for {@link serialiseTelemetryPack}. */
export interface SerialiseOptions {
  /** Offsets from the base time are rounded to this, seconds. Default 0.001 (1 ms). */
  timeResolutionSeconds?: number;
}

/**
 * Builds a compact SenML pack for a gateway. Offsets from the base time are rounded to the time
 * resolution, so resolved times match the input to within half of it. Throws RangeError for an
 * invalid gateway id, a non-finite time or a non-finite number (the simulator's own mistakes).
 */
export function serialiseTelemetryPack(
  gatewayId: string,
  readings: readonly OutgoingReading[],
  options: SerialiseOptions = {},
): SenmlRecord[] {
  if (!isGatewayId(gatewayId)) throw new RangeError(`invalid gateway id "${gatewayId}"`);
  if (readings.length === 0) return [];
  const resolution = options.timeResolutionSeconds ?? 0.001;
  let baseTime = Number.NEGATIVE_INFINITY;
  for (const r of readings) {
    if (!Number.isFinite(r.t)) throw new RangeError(`reading ${r.name} has a non-finite time`);
    if (typeof r.value === 'number' && !Number.isFinite(r.value)) {
      throw new RangeError(`reading ${r.name} has a non-finite value`);
    }
    baseTime = Math.max(baseTime, r.t);
  }
  const units = readings.map((r) => unitFor(r));
  const counts = new Map<string, number>();
  for (const u of units) if (u !== undefined) counts.set(u, (counts.get(u) ?? 0) + 1);
  let baseUnit: string | undefined;
  let best = 1; // a base unit pays off only when two or more records share it
  for (const [u, count] of counts) {
    if (count > best) {
      baseUnit = u;
      best = count;
    }
  }
  return readings.map((reading, i) => {
    const record: SenmlRecord = {};
    if (i === 0) {
      record.bn = senmlBaseNameForGateway(gatewayId);
      record.bt = baseTime;
      if (baseUnit !== undefined) record.bu = baseUnit;
    }
    record.n = reading.name;
    const unit = units[i];
    if (unit !== undefined && unit !== baseUnit) record.u = unit;
    if (typeof reading.value === 'number') record.v = reading.value;
    else if (typeof reading.value === 'boolean') record.vb = reading.value;
    else record.vs = reading.value;
    const offset =
      resolution > 0
        ? Math.round((reading.t - baseTime) / resolution) * resolution
        : reading.t - baseTime;
    const rounded = Number(offset.toFixed(9));
    if (rounded !== 0) record.t = rounded;
    return record;
  });
}

function unitFor(reading: OutgoingReading): string | undefined {
  if (typeof reading.value !== 'number') return undefined;
  if (reading.unit !== undefined) return reading.unit;
  const parsed = parseMeasurementName(reading.name);
  return parsed ? (measurementSpec(parsed.pattern).unit ?? undefined) : undefined;
}

/** {@link serialiseTelemetryPack} as JSON text, ready to publish. */
export function serialiseTelemetryPackJson(
  gatewayId: string,
  readings: readonly OutgoingReading[],
  options?: SerialiseOptions,
): string {
  return JSON.stringify(serialiseTelemetryPack(gatewayId, readings, options));
}
