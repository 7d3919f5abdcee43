import {
  formatAmps,
  formatDurationSeconds,
  formatFlowRate,
  formatFractionAsPercent,
  formatLength,
  formatPressure,
  formatTemperature,
  formatVolts,
  formatVolume,
  formatWatts,
  UNKNOWN_QUANTITY_TEXT,
  type EvidenceItem,
  type UnitSystem,
} from '@wellkept/core';

/** How a recipient reads numbers and times. */
export interface Reader {
  unitSystem: UnitSystem;
  timeZone: string;
}

const timeFormats = new Map<string, Intl.DateTimeFormat>();

/** A date and time on the reader's clock, with the zone named ("Dec 2, 2026, 6:40 AM MST"). */
export function formatTime(at: Date | number, reader: Reader): string {
  const key = `${reader.unitSystem}|${reader.timeZone}`;
  let format = timeFormats.get(key);
  if (!format) {
    format = new Intl.DateTimeFormat(reader.unitSystem === 'us' ? 'en-US' : 'en-GB', {
      timeZone: reader.timeZone,
      dateStyle: 'medium',
      timeStyle: 'short',
      hourCycle: reader.unitSystem === 'us' ? 'h12' : 'h23',
    });
    timeFormats.set(key, format);
  }
  const date = typeof at === 'number' ? new Date(at * 1000) : at;
  return `${format.format(date)} (${zoneName(date, reader.timeZone)})`;
}

function zoneName(date: Date, timeZone: string): string {
  const part = new Intl.DateTimeFormat('en-US', { timeZone, timeZoneName: 'short' })
    .formatToParts(date)
    .find((p) => p.type === 'timeZoneName');
  return part?.value ?? timeZone;
}

/**
 * A value in an SI unit (the evidence and channel units) as the reader's unit system shows it,
 * through core's units module.
 */
export function formatSi(value: number, unit: string | null, reader: Reader): string {
  if (!Number.isFinite(value)) return UNKNOWN_QUANTITY_TEXT;
  switch (unit) {
    case 'V':
      return formatVolts(value).text;
    case 'A':
      return formatAmps(value).text;
    case 'W':
      return formatWatts(value).text;
    case 'Cel':
      return formatTemperature(value, reader.unitSystem).text;
    case 'm':
      return formatLength(value, reader.unitSystem).text;
    case 'm3':
      return formatVolume(value, reader.unitSystem).text;
    case 'm3/s':
      return formatFlowRate(value, reader.unitSystem).text;
    case 'Pa':
      return formatPressure(value, reader.unitSystem).text;
    case 's':
      return formatDurationSeconds(value);
    case 'fraction':
      return formatFractionAsPercent(value).text;
    case 'count':
      return String(Math.round(value));
    case 'days':
      return `${value.toFixed(1)} days`;
    case 'epoch_s':
      return formatTime(value, reader);
    default:
      return String(Math.round(value * 100) / 100) + (unit ? ` ${unit}` : '');
  }
}

/** One evidence item's value as text. */
export function formatEvidenceValue(item: EvidenceItem, reader: Reader): string {
  const v = item.value;
  if (v === null || v === undefined) return UNKNOWN_QUANTITY_TEXT;
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  if (typeof v === 'string') return v;
  if (item.unit === 'days' && !Number.isFinite(v)) return 'not going down';
  return formatSi(v, item.unit, reader);
}
