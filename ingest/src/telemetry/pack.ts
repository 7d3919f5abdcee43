import type { TelemetryReading } from '@wellkept/core';

/** One refused record (or a whole refused pack, with no record name). */
export interface RejectToStore {
  recordName: string | null;
  reason: string;
  /** The record (or the start of the pack) as received, truncated. */
  raw: string | null;
}

/** A validated pack waiting for its group commit. */
export interface PackToStore {
  gatewayId: string;
  siteId: string;
  /** MQTT message id (QoS 1), for the rejects message. */
  messageId: number | undefined;
  /** When the broker received it, ms since the epoch. */
  receivedAt: number;
  recordCount: number;
  /** Accepted records as core's validator returns them (stored without copying). */
  readings: TelemetryReading[];
  rejects: RejectToStore[];
}

/** The `value` column: numbers as they are, switches as 1/0, strings (stages) as null. */
export function storedValue(r: TelemetryReading): number | null {
  return typeof r.value === 'number'
    ? r.value
    : typeof r.value === 'boolean'
      ? r.value
        ? 1
        : 0
      : null;
}

/** The `text_value` column: the controller stage, null otherwise. */
export function storedText(r: TelemetryReading): string | null {
  return typeof r.value === 'string' ? r.value : null;
}
