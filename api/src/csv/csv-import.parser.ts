import {
  isControllerStage,
  measurementSpec,
  type MeasurementValueType,
  parseMeasurementName,
  plausibleRange,
  zonedTimeToEpochSeconds,
} from '@wellkept/core';
import { parse } from 'csv-parse/sync';
import type { ImportMapping, RowProblem } from './dto/csv.dto.js';

export const MAX_IMPORT_ROWS = 500_000;

export interface ParsedTable {
  columns: string[];
  /** Data rows with their 1-based line numbers in the file. */
  rows: { line: number; cells: string[] }[];
}

/** Reads the CSV (header on the first line); throws a message for a file that is not CSV. */
export function readTable(content: Buffer): ParsedTable {
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(content, {
      bom: true,
      info: true,
      skip_empty_lines: true,
      relax_column_count: true,
      trim: true,
    }) as unknown as { record: string[]; info: { lines: number } }[];
  } catch (error) {
    throw new Error(`The file is not readable as CSV: ${(error as Error).message}`);
  }
  const [header, ...data] = records;
  if (!header) throw new Error('The file is empty');
  if (data.length > MAX_IMPORT_ROWS) {
    throw new Error(
      `The file has ${data.length} rows; import at most ${MAX_IMPORT_ROWS} at a time`,
    );
  }
  return {
    columns: header.record,
    rows: data.map((r) => ({ line: r.info.lines, cells: r.record })),
  };
}

/** A mapping guessed from the header: columns named exactly like measurements, and a time column. */
export function suggestMapping(columns: string[]): Partial<ImportMapping> | null {
  const timeColumn = columns.find((c) => /^(time|timestamp|date ?time|datetime)$/i.test(c.trim()));
  const mapped = columns
    .filter((c) => parseMeasurementName(c.trim()) !== null)
    .map((c) => ({ column: c, measurement: c.trim(), scale: 1 }));
  if (!timeColumn && !mapped.length) return null;
  return { ...(timeColumn ? { timeColumn, timeFormat: 'iso' as const } : {}), columns: mapped };
}

export interface MappedMeasurement {
  column: string;
  index: number;
  name: string;
  unit: string;
  valueKind: MeasurementValueType;
  scale: number;
  range: { min: number; max: number } | null;
}

/** Checks a mapping against the header and the telemetry contract; returns problems by field. */
export function resolveMapping(
  mapping: ImportMapping,
  columns: string[],
  context: { batteryNominalVolts?: number },
):
  | { time: number; measurements: MappedMeasurement[] }
  | { problems: { path: string; message: string }[] } {
  const problems: { path: string; message: string }[] = [];
  const time = columns.indexOf(mapping.timeColumn);
  if (time < 0)
    problems.push({
      path: 'mapping.timeColumn',
      message: `the file has no column "${mapping.timeColumn}"`,
    });
  const measurements: MappedMeasurement[] = [];
  const seen = new Set<string>();
  mapping.columns.forEach((c, i) => {
    const index = columns.indexOf(c.column);
    if (index < 0)
      problems.push({
        path: `mapping.columns.${i}.column`,
        message: `the file has no column "${c.column}"`,
      });
    const parsed = parseMeasurementName(c.measurement);
    if (!parsed) {
      problems.push({
        path: `mapping.columns.${i}.measurement`,
        message: `"${c.measurement}" is not a measurement name (e.g. battery/voltage, tank/main/level, pump/well/running)`,
      });
      return;
    }
    if (seen.has(c.measurement)) {
      problems.push({
        path: `mapping.columns.${i}.measurement`,
        message: `${c.measurement} is mapped twice`,
      });
    }
    seen.add(c.measurement);
    const spec = measurementSpec(parsed.pattern);
    const range = plausibleRange(parsed.pattern, context);
    measurements.push({
      column: c.column,
      index,
      name: c.measurement,
      unit: spec.unit ?? '',
      valueKind: spec.valueType,
      scale: c.scale,
      range: range ? { min: range.min, max: range.max } : null,
    });
  });
  return problems.length ? { problems } : { time, measurements };
}

export interface ParsedRow {
  line: number;
  t: number;
  values: { m: MappedMeasurement; value: number | null; text: string | null }[];
}

const LOCAL = /^(\d{4})-(\d{2})-(\d{2})[ T](\d{2}):(\d{2})(?::(\d{2}))?$/;
const ISO = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})$/;

/** Epoch seconds of a time cell, or a reason. */
export function parseTime(
  cell: string,
  format: ImportMapping['timeFormat'],
  timeZone: string,
): number | string {
  if (!cell) return 'the time is empty';
  if (format === 'iso') {
    if (!ISO.test(cell))
      return `"${cell}" is not an ISO 8601 time with an offset (e.g. 2025-06-01T06:00:00Z)`;
    const ms = Date.parse(cell);
    return Number.isFinite(ms) ? ms / 1000 : `"${cell}" is not a valid date`;
  }
  if (format === 'epoch_seconds' || format === 'epoch_milliseconds') {
    const n = Number(cell);
    if (!/^-?\d+(\.\d+)?$/.test(cell) || !Number.isFinite(n))
      return `"${cell}" is not a number of ${format === 'epoch_seconds' ? 'seconds' : 'milliseconds'}`;
    return format === 'epoch_seconds' ? n : n / 1000;
  }
  const m = LOCAL.exec(cell);
  if (!m) return `"${cell}" is not a local time like 2025-06-01 06:00:00`;
  const [, y, mo, d, h, mi, s] = m.map(Number) as number[];
  if (mo! < 1 || mo! > 12 || d! < 1 || d! > 31 || h! > 23 || mi! > 59 || (s ?? 0) > 59)
    return `"${cell}" is not a valid date and time`;
  return zonedTimeToEpochSeconds(
    { year: y!, month: mo!, day: d!, hour: h!, minute: mi!, second: s || 0 },
    timeZone,
  );
}

function parseValue(
  m: MappedMeasurement,
  cell: string,
): { value: number | null; text: string | null } | string {
  if (m.valueKind === 'string') {
    return isControllerStage(cell)
      ? { value: null, text: cell }
      : `"${cell}" is not a controller stage (bulk, absorption, float, equalize, off)`;
  }
  if (m.valueKind === 'boolean') {
    const v = cell.toLowerCase();
    if (['1', 'true', 'on', 'yes'].includes(v)) return { value: 1, text: null };
    if (['0', 'false', 'off', 'no'].includes(v)) return { value: 0, text: null };
    return `"${cell}" is not on/off (1, 0, true, false)`;
  }
  if (!/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(cell)) return `"${cell}" is not a number`;
  const value = Number(cell) * m.scale;
  if (m.range && (value < m.range.min || value > m.range.max)) {
    return `${value} ${m.unit} is outside the plausible range ${m.range.min}–${m.range.max} ${m.unit}`;
  }
  return { value, text: null };
}

/** Parses every row; a row with any bad cell is bad as a whole (nothing of it is stored). */
export function parseRows(
  table: ParsedTable,
  resolved: { time: number; measurements: MappedMeasurement[] },
  format: ImportMapping['timeFormat'],
  timeZone: string,
  now = Date.now() / 1000,
): { good: ParsedRow[]; errors: RowProblem[]; badRows: number } {
  const good: ParsedRow[] = [];
  const errors: RowProblem[] = [];
  let badRows = 0;
  const timeColumn = table.columns[resolved.time] ?? null;
  const seenTimes = new Set<number>();
  for (const row of table.rows) {
    const problems: RowProblem[] = [];
    // A row with more or fewer cells than the header cannot be matched to its columns safely.
    if (row.cells.length !== table.columns.length)
      problems.push({
        line: row.line,
        column: null,
        message: `the line has ${row.cells.length} cells; the header has ${table.columns.length}`,
      });
    const t = parseTime(row.cells[resolved.time] ?? '', format, timeZone);
    if (typeof t === 'string') problems.push({ line: row.line, column: timeColumn, message: t });
    else if (t > now + 300)
      problems.push({ line: row.line, column: timeColumn, message: 'the time is in the future' });
    else if (seenTimes.has(t))
      problems.push({
        line: row.line,
        column: timeColumn,
        message: 'the same time appears on an earlier line',
      });
    const values: ParsedRow['values'] = [];
    for (const m of resolved.measurements) {
      const cell = row.cells[m.index] ?? '';
      if (cell === '') continue; // loggers leave a cell empty when they did not measure it
      const v = parseValue(m, cell);
      if (typeof v === 'string') problems.push({ line: row.line, column: m.column, message: v });
      else values.push({ m, ...v });
    }
    if (problems.length) {
      badRows++;
      errors.push(...problems);
    } else if (typeof t === 'number') {
      seenTimes.add(t);
      if (values.length) good.push({ line: row.line, t, values });
    }
  }
  return { good, errors, badRows };
}
