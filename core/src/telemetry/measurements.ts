/**
 * The measurement names of the Wellkept telemetry contract: what a gateway may send, in which
 * SenML unit and value kind, and which values are plausible. Names follow the base name (see
 * {@link senmlBaseNameForGateway}); `<array>`, `<pump>`, `<tank>`, `<switch>` and `<point>` are
 * equipment keys configured for the site.
 */

/** Measurement name patterns, one per kind of reading. */
export type MeasurementPattern =
  | 'battery/voltage'
  | 'battery/current'
  | 'battery/temperature'
  | 'pv/<array>/voltage'
  | 'pv/<array>/current'
  | 'pump/<pump>/running'
  | 'pump/<pump>/current'
  | 'pump/<pump>/flow'
  | 'tank/<tank>/level'
  | 'float/<switch>/closed'
  | 'pressure/<point>'
  | 'controller/stage'
  | 'well/level';

/** SenML units used by the contract (RFC 8428 §12.1 registry symbols). */
export type SenmlUnit = 'V' | 'A' | 'Cel' | 'm' | 'm3/s' | 'Pa';

/** The SenML value field a measurement uses: v (number), vb (boolean) or vs (string). */
export type MeasurementValueType = 'number' | 'boolean' | 'string';

/** Which equipment a measurement's key names. */
export type EquipmentKind = 'array' | 'pump' | 'tank' | 'switch' | 'point';

/** Charge controller stages, as sent in `controller/stage` (vs). */
export const CONTROLLER_STAGES = ['bulk', 'absorption', 'float', 'equalize', 'off'] as const;
/** A charge controller stage. */
export type ControllerStage = (typeof CONTROLLER_STAGES)[number];

/** Site settings that make plausible ranges sharper. */
export interface MeasurementContext {
  /** Nominal battery bank voltage (12, 24, 48 …), volts. */
  batteryNominalVolts?: number;
}

/** A plausible range for a numeric measurement, with words saying what it depends on. */
export interface PlausibleRange {
  min: number;
  max: number;
  /** e.g. 'for a 24 V bank'; '' when the range is fixed. */
  basis: string;
}

/** One row of the measurement table. */
export interface MeasurementSpec {
  pattern: MeasurementPattern;
  /** What the key in the name identifies, or null for site-wide measurements. */
  equipment: EquipmentKind | null;
  valueType: MeasurementValueType;
  /** SenML unit for numbers; null for booleans and strings. */
  unit: SenmlUnit | null;
  /** Plain words for screens. */
  label: string;
  /** Meaning of the value and its sign. */
  description: string;
}

/** The measurement table of the telemetry contract (product brief, "Telemetry contract"). */
export const MEASUREMENTS: readonly MeasurementSpec[] = [
  {
    pattern: 'battery/voltage',
    equipment: null,
    valueType: 'number',
    unit: 'V',
    label: 'Battery voltage',
    description: 'Voltage across the battery bank terminals, volts.',
  },
  {
    pattern: 'battery/current',
    equipment: null,
    valueType: 'number',
    unit: 'A',
    label: 'Battery current',
    description:
      'Current into the bank, amperes: positive while charging, negative while discharging.',
  },
  {
    pattern: 'battery/temperature',
    equipment: null,
    valueType: 'number',
    unit: 'Cel',
    label: 'Battery temperature',
    description: 'Temperature at the bank, degrees Celsius.',
  },
  {
    pattern: 'pv/<array>/voltage',
    equipment: 'array',
    valueType: 'number',
    unit: 'V',
    label: 'PV array voltage',
    description: 'Voltage of a PV array at the controller input, volts.',
  },
  {
    pattern: 'pv/<array>/current',
    equipment: 'array',
    valueType: 'number',
    unit: 'A',
    label: 'PV array current',
    description: 'Current from a PV array, amperes.',
  },
  {
    pattern: 'pump/<pump>/running',
    equipment: 'pump',
    valueType: 'boolean',
    unit: null,
    label: 'Pump running',
    description: 'True while the pump is switched on.',
  },
  {
    pattern: 'pump/<pump>/current',
    equipment: 'pump',
    valueType: 'number',
    unit: 'A',
    label: 'Pump current',
    description: 'Current drawn by the pump motor, amperes.',
  },
  {
    pattern: 'pump/<pump>/flow',
    equipment: 'pump',
    valueType: 'number',
    unit: 'm3/s',
    label: 'Pump flow',
    description: 'Flow from a meter on the pump discharge, cubic metres per second (optional).',
  },
  {
    pattern: 'tank/<tank>/level',
    equipment: 'tank',
    valueType: 'number',
    unit: 'm',
    label: 'Tank level',
    description: 'Level sensor reading, metres (the tank sensor offset is added to get depth).',
  },
  {
    pattern: 'float/<switch>/closed',
    equipment: 'switch',
    valueType: 'boolean',
    unit: null,
    label: 'Float switch closed',
    description: 'True while the float switch contacts are closed.',
  },
  {
    pattern: 'pressure/<point>',
    equipment: 'point',
    valueType: 'number',
    unit: 'Pa',
    label: 'Pressure',
    description: 'Gauge pressure at a point of the system, pascals.',
  },
  {
    pattern: 'controller/stage',
    equipment: null,
    valueType: 'string',
    unit: null,
    label: 'Charge stage',
    description: `Charge controller stage: ${CONTROLLER_STAGES.join(', ')}.`,
  },
  {
    pattern: 'well/level',
    equipment: null,
    valueType: 'number',
    unit: 'm',
    label: 'Depth to water',
    description: 'Depth from the well head down to the water, metres (optional).',
  },
];

const SPEC_BY_PATTERN = new Map(MEASUREMENTS.map((m) => [m.pattern, m]));

/** The table row for a pattern. */
export function measurementSpec(pattern: MeasurementPattern): MeasurementSpec {
  return SPEC_BY_PATTERN.get(pattern) as MeasurementSpec;
}

/**
 * Equipment keys: 1–40 characters of letters, digits, '-' and '_', starting with a letter or
 * digit (a subset of the characters SenML allows in names, RFC 8428 §4.5.1).
 */
export const EQUIPMENT_KEY_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_-]{0,39}$/;

/** Returns true when `key` can be used as an equipment key in measurement names. */
export function isEquipmentKey(key: string): boolean {
  return EQUIPMENT_KEY_PATTERN.test(key);
}

/** A measurement name split into its pattern and equipment key. */
export interface ParsedMeasurementName {
  pattern: MeasurementPattern;
  /** Equipment key, or null for site-wide measurements. */
  key: string | null;
}

/**
 * Names already parsed. Every pack repeats the same few names, and parsing (split, template,
 * lookup) was the largest cost of validating one in ingest's profile. Bounded: a gateway sending
 * ever new names only makes the cache start over.
 */
const PARSED_NAMES = new Map<string, Readonly<ParsedMeasurementName> | null>();
const PARSED_NAMES_LIMIT = 4096;

/** Parses a measurement name such as 'pump/well/current'; null when it is not in the table. */
export function parseMeasurementName(name: string): Readonly<ParsedMeasurementName> | null {
  const cached = PARSED_NAMES.get(name);
  if (cached !== undefined) return cached;
  const parsed = parseUncached(name);
  if (PARSED_NAMES.size >= PARSED_NAMES_LIMIT) PARSED_NAMES.clear();
  PARSED_NAMES.set(name, parsed === null ? null : Object.freeze(parsed));
  return parsed;
}

function parseUncached(name: string): ParsedMeasurementName | null {
  const parts = name.split('/');
  const [first, second, third] = parts;
  if (parts.length === 2) {
    const fixed = `${first}/${second}`;
    if (fixed === 'battery/voltage' || fixed === 'battery/current') {
      return { pattern: fixed, key: null };
    }
    if (fixed === 'battery/temperature' || fixed === 'controller/stage' || fixed === 'well/level') {
      return { pattern: fixed, key: null };
    }
    if (first === 'pressure' && second !== undefined && isEquipmentKey(second)) {
      return { pattern: 'pressure/<point>', key: second };
    }
    return null;
  }
  if (parts.length !== 3 || second === undefined || !isEquipmentKey(second)) return null;
  const pattern = `${first}/<${equipmentSlot(first)}>/${third}`;
  const spec = SPEC_BY_PATTERN.get(pattern as MeasurementPattern);
  return spec ? { pattern: spec.pattern, key: second } : null;
}

function equipmentSlot(prefix: string | undefined): string {
  switch (prefix) {
    case 'pv':
      return 'array';
    case 'pump':
      return 'pump';
    case 'tank':
      return 'tank';
    case 'float':
      return 'switch';
    default:
      return '?';
  }
}

/**
 * Builds a measurement name from a pattern and, for equipment measurements, the key.
 * Throws RangeError when the key is missing or not a valid equipment key (a programming error).
 */
export function measurementName(pattern: MeasurementPattern, key?: string): string {
  const spec = measurementSpec(pattern);
  if (spec.equipment === null) return pattern;
  if (key === undefined || !isEquipmentKey(key)) {
    throw new RangeError(`${pattern} needs a valid equipment key, got ${String(key)}`);
  }
  return pattern.replace(/<[a-z]+>/, key);
}

/**
 * The range of values a healthy installation can produce for a numeric measurement; values
 * outside are sensor or wiring faults and are refused. Battery voltage depends on the bank.
 */
export function plausibleRange(
  pattern: MeasurementPattern,
  context: MeasurementContext = {},
): PlausibleRange | null {
  switch (pattern) {
    case 'battery/voltage': {
      const nominal = context.batteryNominalVolts;
      if (nominal !== undefined && Number.isFinite(nominal) && nominal > 0) {
        // Up to 5/3 of nominal leaves room for equalising a cold flooded bank (2.7 V/cell).
        return { min: 0, max: Math.ceil((nominal * 5) / 3), basis: `for a ${nominal} V bank` };
      }
      return { min: 0, max: 80, basis: 'for any bank up to 48 V' };
    }
    case 'battery/current':
      return { min: -2000, max: 2000, basis: '' };
    case 'battery/temperature':
      return { min: -50, max: 90, basis: '' };
    case 'pv/<array>/voltage':
      return { min: -1, max: 600, basis: '' };
    case 'pv/<array>/current':
      return { min: -5, max: 500, basis: '' };
    case 'pump/<pump>/current':
      return { min: -1, max: 200, basis: '' };
    case 'pump/<pump>/flow':
      return { min: -0.001, max: 0.1, basis: '' };
    case 'tank/<tank>/level':
      return { min: -1, max: 30, basis: '' };
    case 'pressure/<point>':
      return { min: -101_325, max: 3_000_000, basis: '' };
    case 'well/level':
      return { min: -20, max: 2000, basis: '' };
    default:
      return null;
  }
}

/** Returns true when `value` is a controller stage name. */
export function isControllerStage(value: unknown): value is ControllerStage {
  return typeof value === 'string' && (CONTROLLER_STAGES as readonly string[]).includes(value);
}
