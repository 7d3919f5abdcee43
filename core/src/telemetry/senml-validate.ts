/**
 * SenML JSON (RFC 8428) for Wellkept telemetry: a generic resolver that turns a pack into
 * resolved records (RFC 8428 §4.6), and the product validator on top of it that checks names,
 * units, value kinds, plausible ranges and times, keeping every good record and giving a
 * human-readable reason for every bad one. Neither function throws on any input, and neither
 * yields NaN or Infinity.
 *
 * Base name convention: a gateway sends `"bn": "urn:dev:wellkept:<gateway-id>:"` and the
 * measurement names of {@link MEASUREMENTS} as `n`, so the resolved name of a reading is, for
 * example, `urn:dev:wellkept:gw-0042:battery/voltage`. Gateway ids are 1–64 characters of
 * letters, digits, '-', '_' and '.', starting with a letter or digit.
 */
import {
  type MeasurementContext,
  type MeasurementPattern,
  type SenmlUnit,
  type MeasurementValueType,
  isControllerStage,
  measurementSpec,
  parseMeasurementName,
  plausibleRange,
  CONTROLLER_STAGES,
} from './measurements.js';

/** Times below this are relative to "now" (RFC 8428 §4.5.3): 2^28 seconds. */
export const SENML_RELATIVE_TIME_LIMIT = 2 ** 28;
/** The SenML version this code understands (RFC 8428 §4.4: default 10). */
export const SENML_VERSION = 10;
/** The base-name prefix of every Wellkept gateway. */
export const SENML_BASE_NAME_PREFIX = 'urn:dev:wellkept:';
/** Gateway ids: letters, digits, '-', '_', '.', 1–64 characters, starting with a letter or digit. */
export const GATEWAY_ID_PATTERN = /^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$/;

/** Size and count limits for one pack. */
export interface SenmlLimits {
  /** Largest JSON text accepted, bytes (checked when text or bytes are given). */
  maxPackBytes: number;
  /** Most records in one pack. */
  maxRecords: number;
  /** Longest resolved name, characters. */
  maxNameLength: number;
  /** Longest string (vs) or data (vd) value, characters. */
  maxStringLength: number;
  /** How far ahead of now a reading may be stamped, seconds. */
  maxFutureSeconds: number;
  /** How far back a reading may be stamped (store-and-forward after an outage), seconds. */
  maxAgeSeconds: number;
}

/** Default limits: 256 KiB, 5000 records, 200-character names, 64-character strings, 5 min ahead, 30 days back. */
export const DEFAULT_SENML_LIMITS: Readonly<SenmlLimits> = {
  maxPackBytes: 256 * 1024,
  maxRecords: 5000,
  maxNameLength: 200,
  maxStringLength: 64,
  maxFutureSeconds: 300,
  maxAgeSeconds: 30 * 86_400,
};

/** A record after base fields and relative times are applied (RFC 8428 §4.6). */
export interface ResolvedSenmlRecord {
  /** Position of the record in the pack, from 0. */
  index: number;
  /** Full name: base name + name. */
  n: string;
  u?: string;
  v?: number;
  vs?: string;
  vb?: boolean;
  vd?: string;
  s?: number;
  /** Absolute time, seconds since the epoch. */
  t: number;
  ut?: number;
}

/** Why one record was not used. */
export interface SenmlRecordRejection {
  /** Position of the record in the pack, from 0. */
  index: number;
  /** The resolved name, or null when it could not be worked out. */
  name: string | null;
  /** Human-readable reason, for the installer. */
  reason: string;
}

/** Outcome of resolving a pack. */
export type SenmlResolution =
  | {
      ok: true;
      records: ResolvedSenmlRecord[];
      rejected: SenmlRecordRejection[];
      /** Records that only set base fields (e.g. RFC 8428 §5.1.7's first record). */
      baseOnlyRecords: number;
      recordCount: number;
    }
  | { ok: false; reason: string };

/** Options for {@link resolveSenmlPack}. */
export interface SenmlResolveOptions {
  /** The receiver's clock, epoch seconds: the "now" that relative times count from. */
  nowSeconds: number;
  limits?: Partial<SenmlLimits>;
}

const NAME_PATTERN = /^[A-Za-z0-9][A-Za-z0-9\-:./_]*$/;
const KNOWN_FIELDS = new Set([
  'bn',
  'bt',
  'bu',
  'bv',
  'bs',
  'bver',
  'n',
  'u',
  'v',
  'vs',
  'vb',
  'vd',
  's',
  't',
  'ut',
]);

function own(record: Record<string, unknown>, key: string): boolean {
  return Object.prototype.hasOwnProperty.call(record, key);
}

/** Formats an epoch time for a reason: ISO 8601 without milliseconds when whole. */
export function describeEpochSeconds(t: number): string {
  if (!Number.isFinite(t) || Math.abs(t) > 8.64e12) return `${String(t)} s`;
  const iso = new Date(t * 1000).toISOString();
  return iso.endsWith('.000Z') ? `${iso.slice(0, -5)}Z` : iso;
}

function describeValue(value: unknown): string {
  if (typeof value === 'string') return `"${value.length > 20 ? `${value.slice(0, 20)}…` : value}"`;
  if (typeof value === 'number')
    return Number.isFinite(value) ? String(value) : 'a non-finite number';
  if (typeof value === 'boolean') return String(value);
  if (value === null) return 'null';
  if (value === undefined) return 'nothing';
  if (Array.isArray(value)) return 'an array';
  return `a${typeof value === 'object' ? 'n object' : ` ${typeof value}`}`;
}

function limitsWith(partial: Partial<SenmlLimits> | undefined): SenmlLimits {
  const limits = { ...DEFAULT_SENML_LIMITS };
  if (partial) {
    for (const key of Object.keys(limits) as (keyof SenmlLimits)[]) {
      const value = partial[key];
      if (typeof value === 'number' && Number.isFinite(value) && value >= 0) limits[key] = value;
    }
  }
  return limits;
}

/** One decoder for every pack: without `stream` a decode call keeps no state between calls. */
const UTF8 = new TextDecoder('utf-8', { fatal: true });
const UTF8_ENCODER = new TextEncoder();

/** Turns text or bytes into a parsed value, or a pack-level reason. */
function parsePackInput(
  input: unknown,
  limits: SenmlLimits,
): { ok: true; value: unknown } | { ok: false; reason: string } {
  let text: string;
  if (typeof input === 'string') {
    const bytes = UTF8_ENCODER.encode(input).byteLength;
    if (bytes > limits.maxPackBytes) {
      return {
        ok: false,
        reason: `pack is ${bytes} bytes, more than the limit of ${limits.maxPackBytes}`,
      };
    }
    text = input;
  } else if (input instanceof Uint8Array) {
    if (input.byteLength > limits.maxPackBytes) {
      return {
        ok: false,
        reason: `pack is ${input.byteLength} bytes, more than the limit of ${limits.maxPackBytes}`,
      };
    }
    try {
      text = UTF8.decode(input);
    } catch {
      return { ok: false, reason: 'pack is not valid UTF-8 text' };
    }
  } else {
    return { ok: true, value: input };
  }
  try {
    return { ok: true, value: JSON.parse(text) as unknown };
  } catch {
    return { ok: false, reason: 'pack is not valid JSON' };
  }
}

interface BaseField<T> {
  value: T;
  /** Set when a record tried to set this base field to something invalid. */
  brokenAt: number | null;
}

/** The fields that carry a record's value, besides the sum `s` (RFC 8428 §4.2). */
const VALUE_FIELDS = ['v', 'vs', 'vb', 'vd'] as const;

/** Applies a base name or unit a record sets (RFC 8428 §4.5), or notes why it cannot. */
function setBaseString(
  r: Record<string, unknown>,
  key: 'bn' | 'bu',
  field: BaseField<string> | BaseField<string | undefined>,
  index: number,
  limits: SenmlLimits,
  problems: string[],
): void {
  if (!own(r, key)) return;
  const value = r[key];
  if (typeof value === 'string' && value.length <= limits.maxNameLength) {
    field.value = value;
    field.brokenAt = null;
  } else {
    field.brokenAt = index;
    problems.push(`${key} must be a string of at most ${limits.maxNameLength} characters`);
  }
}

/** Applies a base time, value or sum a record sets, or notes why it cannot. */
function setBaseNumber(
  r: Record<string, unknown>,
  key: 'bt' | 'bv' | 'bs',
  field: BaseField<number>,
  index: number,
  problems: string[],
): void {
  if (!own(r, key)) return;
  const value = r[key];
  if (typeof value === 'number' && Number.isFinite(value)) {
    field.value = value;
    field.brokenAt = null;
  } else {
    field.brokenAt = index;
    problems.push(`${key} must be a finite number, got ${describeValue(value)}`);
  }
}

/**
 * Resolves a SenML JSON pack (RFC 8428): applies base name, time, unit, value and sum to each
 * record, turns relative times (bt + t below 2^28, §4.5.3) into absolute ones from `nowSeconds`,
 * and checks names (§4.5.1), value fields and types. `input` may be JSON text, UTF-8 bytes or an
 * already parsed value. Records with problems are listed with a reason; the pack as a whole is
 * refused only when it is not an array of objects, too large, of a newer SenML version (§4.4),
 * or uses a must-understand field (name ending in '_', §4.4) this code does not know.
 */
export function resolveSenmlPack(input: unknown, options: SenmlResolveOptions): SenmlResolution {
  const now = Number.isFinite(options.nowSeconds) ? options.nowSeconds : 0;
  return resolveWithLimits(input, now, limitsWith(options.limits));
}

function resolveWithLimits(input: unknown, now: number, limits: SenmlLimits): SenmlResolution {
  try {
    return resolveUnchecked(input, now, limits);
  } catch (error) {
    // Nothing above should throw; this keeps the promise of never throwing if something does.
    return { ok: false, reason: `pack could not be read (${String(error)})` };
  }
}

function resolveUnchecked(input: unknown, now: number, limits: SenmlLimits): SenmlResolution {
  const parsed = parsePackInput(input, limits);
  if (!parsed.ok) return parsed;
  const pack = parsed.value;
  if (!Array.isArray(pack)) return { ok: false, reason: 'pack is not a JSON array of records' };
  if (pack.length > limits.maxRecords) {
    return {
      ok: false,
      reason: `pack has ${pack.length} records, more than the limit of ${limits.maxRecords}`,
    };
  }
  // Pack-wide checks first: version and must-understand fields refuse the whole pack.
  for (let i = 0; i < pack.length; i += 1) {
    const record: unknown = pack[i];
    if (typeof record !== 'object' || record === null || Array.isArray(record)) {
      return { ok: false, reason: `record ${i + 1} is ${describeValue(record)}, not an object` };
    }
    const r = record as Record<string, unknown>;
    for (const key of Object.keys(r)) {
      if (key.endsWith('_') && !KNOWN_FIELDS.has(key)) {
        return {
          ok: false,
          reason: `record ${i + 1} uses the must-understand field "${key.slice(0, 40)}", which is not supported (RFC 8428 §4.4)`,
        };
      }
    }
    if (own(r, 'bver')) {
      const bver = r.bver;
      if (typeof bver !== 'number' || !Number.isInteger(bver) || bver < 1) {
        return { ok: false, reason: `record ${i + 1}: bver must be a positive integer` };
      }
      if (bver > SENML_VERSION) {
        return {
          ok: false,
          reason: `SenML version ${bver} is newer than the supported version ${SENML_VERSION}`,
        };
      }
    }
  }

  const baseName: BaseField<string> = { value: '', brokenAt: null };
  const baseTime: BaseField<number> = { value: 0, brokenAt: null };
  const baseUnit: BaseField<string | undefined> = { value: undefined, brokenAt: null };
  const baseValue: BaseField<number> = { value: 0, brokenAt: null };
  const baseSum: BaseField<number> = { value: 0, brokenAt: null };

  const bases = [
    [baseName, 'base name'],
    [baseTime, 'base time'],
    [baseUnit, 'base unit'],
    [baseValue, 'base value'],
    [baseSum, 'base sum'],
  ] as const;

  const records: ResolvedSenmlRecord[] = [];
  const rejected: SenmlRecordRejection[] = [];
  let baseOnlyRecords = 0;

  // Runs once per record of every pack ingest receives: no closures or arrays made per record
  // beyond the list of problems (allocation showed up as garbage collection in ingest profiles).
  for (let index = 0; index < pack.length; index += 1) {
    const r = pack[index] as Record<string, unknown>;
    const problems: string[] = [];

    setBaseString(r, 'bn', baseName, index, limits, problems);
    setBaseNumber(r, 'bt', baseTime, index, problems);
    setBaseString(r, 'bu', baseUnit, index, limits, problems);
    setBaseNumber(r, 'bv', baseValue, index, problems);
    setBaseNumber(r, 'bs', baseSum, index, problems);

    let valueFields = 0;
    for (const k of VALUE_FIELDS) if (own(r, k)) valueFields += 1;
    const hasValueField = valueFields > 0 || own(r, 's');
    if (!hasValueField && !own(r, 'n') && !own(r, 'u') && !own(r, 't') && problems.length === 0) {
      // A record that only sets base fields carries no measurement (RFC 8428 §5.1.7).
      const keys = Object.keys(r).filter((k) => KNOWN_FIELDS.has(k));
      if (keys.length > 0 && keys.every((k) => k.startsWith('b'))) {
        baseOnlyRecords += 1;
        continue;
      }
    }

    for (const [field, label] of bases) {
      if (field.brokenAt !== null && field.brokenAt !== index) {
        problems.push(`the ${label} set in record ${field.brokenAt + 1} is invalid`);
      }
    }

    let name: string | null = null;
    if (own(r, 'n') && typeof r.n !== 'string') {
      problems.push(`n must be a string, got ${describeValue(r.n)}`);
    } else {
      const full = baseName.value + (typeof r.n === 'string' ? r.n : '');
      if (full.length === 0) problems.push('record has no name (neither bn nor n)');
      else if (full.length > limits.maxNameLength) {
        problems.push(`name is ${full.length} characters, more than ${limits.maxNameLength}`);
      } else if (!NAME_PATTERN.test(full)) {
        problems.push(
          `name "${full.slice(0, 60)}" has characters outside A–Z a–z 0–9 - : . / _ or does not start with a letter or digit (RFC 8428 §4.5.1)`,
        );
      } else name = full;
    }

    let unit: string | undefined = baseUnit.value;
    if (own(r, 'u')) {
      if (typeof r.u === 'string' && r.u.length <= limits.maxNameLength) unit = r.u;
      else problems.push(`u must be a string, got ${describeValue(r.u)}`);
    }

    if (valueFields > 1) {
      const present = VALUE_FIELDS.filter((k) => own(r, k));
      problems.push(`record has more than one value (${present.join(', ')})`);
    }
    if (valueFields === 0 && !own(r, 's'))
      problems.push('record has no value (v, vs, vb, vd or s)');

    const resolved: ResolvedSenmlRecord = { index, n: name ?? '', t: 0 };
    if (unit !== undefined) resolved.u = unit;
    if (own(r, 'v')) {
      if (typeof r.v !== 'number' || !Number.isFinite(r.v)) {
        problems.push(`v must be a finite number, got ${describeValue(r.v)}`);
      } else {
        const v = baseValue.value + r.v;
        if (Number.isFinite(v)) resolved.v = v;
        else problems.push('base value plus v is not a finite number');
      }
    }
    if (own(r, 'vs')) {
      if (typeof r.vs !== 'string')
        problems.push(`vs must be a string, got ${describeValue(r.vs)}`);
      else if (r.vs.length > limits.maxStringLength) {
        problems.push(`vs is ${r.vs.length} characters, more than ${limits.maxStringLength}`);
      } else resolved.vs = r.vs;
    }
    if (own(r, 'vb')) {
      if (typeof r.vb !== 'boolean')
        problems.push(`vb must be true or false, got ${describeValue(r.vb)}`);
      else resolved.vb = r.vb;
    }
    if (own(r, 'vd')) {
      if (typeof r.vd !== 'string')
        problems.push(`vd must be a string, got ${describeValue(r.vd)}`);
      else if (r.vd.length > limits.maxStringLength) {
        problems.push(`vd is ${r.vd.length} characters, more than ${limits.maxStringLength}`);
      } else resolved.vd = r.vd;
    }
    if (own(r, 's')) {
      if (typeof r.s !== 'number' || !Number.isFinite(r.s)) {
        problems.push(`s must be a finite number, got ${describeValue(r.s)}`);
      } else {
        const s = baseSum.value + r.s;
        if (Number.isFinite(s)) resolved.s = s;
        else problems.push('base sum plus s is not a finite number');
      }
    }
    let relative = 0;
    if (own(r, 't')) {
      if (typeof r.t !== 'number' || !Number.isFinite(r.t)) {
        problems.push(`t must be a finite number, got ${describeValue(r.t)}`);
      } else relative = r.t;
    }
    const sum = baseTime.value + relative;
    const t = sum < SENML_RELATIVE_TIME_LIMIT ? now + sum : sum;
    if (!Number.isFinite(t)) problems.push('time is not a finite number');
    else resolved.t = t;
    if (own(r, 'ut')) {
      if (typeof r.ut !== 'number' || !Number.isFinite(r.ut) || r.ut < 0) {
        problems.push(`ut must be a non-negative number, got ${describeValue(r.ut)}`);
      } else resolved.ut = r.ut;
    }

    if (problems.length > 0) {
      rejected.push({ index, name, reason: problems.join('; ') });
    } else {
      records.push(resolved);
    }
  }
  return { ok: true, records, rejected, baseOnlyRecords, recordCount: pack.length };
}

// ---------------------------------------------------------------------------------------------
// The Wellkept contract on top of SenML

/** Builds the base name a gateway puts in `bn`: `urn:dev:wellkept:<gateway-id>:`. */
export function senmlBaseNameForGateway(gatewayId: string): string {
  return `${SENML_BASE_NAME_PREFIX}${gatewayId}:`;
}

/** Returns true when `id` is a valid gateway id. */
export function isGatewayId(id: string): boolean {
  return GATEWAY_ID_PATTERN.test(id);
}

/**
 * Splits a resolved name into gateway id and measurement name; null when it does not start with
 * `urn:dev:wellkept:<gateway-id>:`.
 */
export function splitResolvedName(
  fullName: string,
): { gatewayId: string; measurementName: string } | null {
  if (!fullName.startsWith(SENML_BASE_NAME_PREFIX)) return null;
  const rest = fullName.slice(SENML_BASE_NAME_PREFIX.length);
  const colon = rest.indexOf(':');
  if (colon <= 0) return null;
  const gatewayId = rest.slice(0, colon);
  if (!isGatewayId(gatewayId)) return null;
  return { gatewayId, measurementName: rest.slice(colon + 1) };
}

/** One accepted reading, ready to store. */
export interface TelemetryReading {
  /** Measurement name after the base name, e.g. 'pump/well/current'. */
  name: string;
  pattern: MeasurementPattern;
  /** Equipment key from the name, or null for site-wide measurements. */
  key: string | null;
  /** Time of the reading, seconds since the epoch (absolute, resolved). */
  t: number;
  valueType: MeasurementValueType;
  /** Number in the SI unit of the measurement, boolean for switches, stage name for the controller. */
  value: number | boolean | string;
  /** SenML unit for numbers; null for booleans and strings. */
  unit: SenmlUnit | null;
}

/** Why a record of a telemetry pack was refused. */
export type TelemetryRejection = SenmlRecordRejection;

/** What the validator needs to know about the receiver and the site. */
export interface TelemetryValidationContext extends MeasurementContext {
  /** Receiver's clock, epoch seconds. */
  nowSeconds: number;
  /** When given, every record must belong to this gateway (the MQTT client that sent it). */
  gatewayId?: string;
  limits?: Partial<SenmlLimits>;
}

/** Outcome of validating a telemetry pack. */
export interface TelemetryValidation {
  /** Set when the whole pack was refused; `readings` is then empty. */
  packError: string | null;
  /** The gateway the readings belong to (from the context, or the first resolved name). */
  gatewayId: string | null;
  readings: TelemetryReading[];
  rejected: TelemetryRejection[];
  /** Records that only set base fields and carry no reading. */
  baseOnlyRecords: number;
  /** Records in the pack: readings + rejected + base-only records, unless the pack was refused. */
  recordCount: number;
}

/**
 * Validates and normalises a Wellkept telemetry pack (SenML JSON, RFC 8428): resolves it, then
 * checks each record's gateway, measurement name, value kind, unit, plausible range (sharper when
 * the bank's nominal voltage is known), controller stage, time window and duplicates. Good
 * records are kept even when others are refused. `input` may be JSON text, UTF-8 bytes or a
 * parsed value. Never throws; never yields NaN or Infinity.
 */
export function validateTelemetryPack(
  input: unknown,
  context: TelemetryValidationContext,
): TelemetryValidation {
  const limits = limitsWith(context.limits);
  const now = Number.isFinite(context.nowSeconds) ? context.nowSeconds : 0;
  const expectedGateway = context.gatewayId ?? null;
  const resolution = resolveWithLimits(input, now, limits);
  if (!resolution.ok) {
    return {
      packError: resolution.reason,
      gatewayId: expectedGateway,
      readings: [],
      rejected: [],
      baseOnlyRecords: 0,
      recordCount: Array.isArray(input) ? input.length : 0,
    };
  }
  const readings: TelemetryReading[] = [];
  const rejected: TelemetryRejection[] = resolution.rejected;
  let gatewayId = expectedGateway;
  // Readings kept so far, by time then name (the record each came from): records of a pack
  // mostly share one time, so this is one small map per time and no key built per record.
  const seen = new Map<number, Map<string, number>>();
  // Records of a pack share one base name: split the name of the first record the long way,
  // then take the measurement name of the others after the same prefix.
  let prefix: string | null = null;
  let prefixSplit: { gatewayId: string } | null = null;

  for (const record of resolution.records) {
    const reject = (name: string | null, reason: string) =>
      rejected.push({ index: record.index, name, reason });
    let split: { gatewayId: string; measurementName: string } | null;
    if (prefix !== null && prefixSplit !== null && record.n.startsWith(prefix)) {
      split = {
        gatewayId: prefixSplit.gatewayId,
        measurementName: record.n.slice(prefix.length),
      };
    } else {
      split = splitResolvedName(record.n);
      if (split) {
        // A valid gateway id has no ':', so the name's first ':' after the URN prefix ends it.
        prefix = `${SENML_BASE_NAME_PREFIX}${split.gatewayId}:`;
        prefixSplit = split;
      }
    }
    if (!split) {
      reject(
        record.n,
        `name "${record.n.slice(0, 60)}" does not start with ${SENML_BASE_NAME_PREFIX}<gateway-id>:`,
      );
      continue;
    }
    const label = split.measurementName || '(empty name)';
    if (gatewayId === null) gatewayId = split.gatewayId;
    if (split.gatewayId !== gatewayId) {
      reject(label, `${label}: belongs to gateway ${split.gatewayId}, not ${gatewayId}`);
      continue;
    }
    const parsed = parseMeasurementName(split.measurementName);
    if (!parsed) {
      reject(label, `${label}: not a Wellkept measurement name`);
      continue;
    }
    const spec = measurementSpec(parsed.pattern);
    let value: number | boolean | string;
    if (spec.valueType === 'number') {
      if (record.v === undefined) {
        reject(label, `${label}: needs a number (v), got ${valueKindOf(record)}`);
        continue;
      }
      if (record.u !== spec.unit) {
        reject(
          label,
          record.u === undefined
            ? `${label}: unit missing, expected ${spec.unit}`
            : `${label}: unit "${record.u}" is not the expected ${spec.unit}`,
        );
        continue;
      }
      const range = plausibleRange(parsed.pattern, context);
      if (range && (record.v < range.min || record.v > range.max)) {
        const unitText = displayUnit(spec.unit);
        reject(
          label,
          `${label}: value ${record.v} ${unitText} outside ${range.min}–${range.max} ${unitText}${range.basis ? ` ${range.basis}` : ''}`,
        );
        continue;
      }
      value = record.v;
    } else if (spec.valueType === 'boolean') {
      if (record.vb === undefined) {
        reject(label, `${label}: needs true or false (vb), got ${valueKindOf(record)}`);
        continue;
      }
      value = record.vb;
    } else {
      if (record.vs === undefined) {
        reject(label, `${label}: needs a string (vs), got ${valueKindOf(record)}`);
        continue;
      }
      if (parsed.pattern === 'controller/stage' && !isControllerStage(record.vs)) {
        reject(label, `${label}: "${record.vs}" is not a stage (${CONTROLLER_STAGES.join(', ')})`);
        continue;
      }
      value = record.vs;
    }
    if (record.t > now + limits.maxFutureSeconds) {
      reject(
        label,
        `${label}: time ${describeEpochSeconds(record.t)} is more than ${describeSpan(limits.maxFutureSeconds)} in the future`,
      );
      continue;
    }
    if (record.t < now - limits.maxAgeSeconds) {
      reject(
        label,
        `${label}: time ${describeEpochSeconds(record.t)} is more than ${describeSpan(limits.maxAgeSeconds)} in the past`,
      );
      continue;
    }
    let atTime = seen.get(record.t);
    const earlier = atTime?.get(split.measurementName);
    if (earlier !== undefined) {
      reject(label, `${label}: repeats record ${earlier + 1} (same name and time)`);
      continue;
    }
    if (!atTime) seen.set(record.t, (atTime = new Map()));
    atTime.set(split.measurementName, record.index);
    readings.push({
      name: split.measurementName,
      pattern: parsed.pattern,
      key: parsed.key,
      t: record.t,
      valueType: spec.valueType,
      value,
      unit: spec.unit,
    });
  }
  rejected.sort((a, b) => a.index - b.index);
  return {
    packError: null,
    gatewayId,
    readings,
    rejected,
    baseOnlyRecords: resolution.baseOnlyRecords,
    recordCount: resolution.recordCount,
  };
}

function valueKindOf(record: ResolvedSenmlRecord): string {
  if (record.v !== undefined) return 'a number (v)';
  if (record.vb !== undefined) return 'a boolean (vb)';
  if (record.vs !== undefined) return 'a string (vs)';
  if (record.vd !== undefined) return 'data (vd)';
  return 'only a sum (s)';
}

function displayUnit(unit: SenmlUnit | null): string {
  return unit === 'Cel' ? '°C' : (unit ?? '');
}

function describeSpan(seconds: number): string {
  if (seconds % 86_400 === 0 && seconds >= 86_400) return `${seconds / 86_400} days`;
  if (seconds % 3600 === 0 && seconds >= 3600) return `${seconds / 3600} hours`;
  if (seconds % 60 === 0 && seconds >= 60) return `${seconds / 60} minutes`;
  return `${seconds} seconds`;
}
