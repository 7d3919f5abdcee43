import {
  cubicMetresPerSecondToLitresPerMinute,
  cubicMetresPerSecondToUsGallonsPerMinute,
  celsiusToFahrenheit,
  formatFlowRate,
  formatLength,
  formatPressure,
  formatQuantity,
  formatTemperature,
  metresToFeet,
  pascalsToPsi,
  type DisplayQuantity,
  type UnitSystem,
} from '@wellkept/core';

/**
 * Telemetry arrives in SenML's SI units (m, m3/s, Pa, Cel, V, A). These pick the person's
 * display unit and convert through @wellkept/core's units module, never with local factors.
 */
export interface DisplayScale {
  unit: string;
  convert: (si: number) => number;
  format: (si: number) => DisplayQuantity;
}

export function displayScale(senmlUnit: string, system: UnitSystem): DisplayScale {
  switch (senmlUnit) {
    case 'm':
      return {
        unit: system === 'us' ? 'ft' : 'm',
        convert: system === 'us' ? metresToFeet : (v) => v,
        format: (v) => formatLength(v, system),
      };
    case 'm3/s':
      return {
        unit: system === 'us' ? 'gpm' : 'L/min',
        convert:
          system === 'us'
            ? cubicMetresPerSecondToUsGallonsPerMinute
            : cubicMetresPerSecondToLitresPerMinute,
        format: (v) => formatFlowRate(v, system),
      };
    case 'Pa':
      return {
        unit: system === 'us' ? 'psi' : 'kPa',
        convert: system === 'us' ? pascalsToPsi : (v) => v / 1000,
        format: (v) => formatPressure(v, system),
      };
    case 'Cel':
      return {
        unit: system === 'us' ? '°F' : '°C',
        convert: system === 'us' ? celsiusToFahrenheit : (v) => v,
        format: (v) => formatTemperature(v, system),
      };
    case 'V':
      return {
        unit: 'V',
        convert: (v) => v,
        format: (v) => formatQuantity(v, 'V', { fractionDigits: 2 }),
      };
    case 'A':
      return {
        unit: 'A',
        convert: (v) => v,
        format: (v) => formatQuantity(v, 'A', { fractionDigits: 1 }),
      };
    default:
      return { unit: senmlUnit, convert: (v) => v, format: (v) => formatQuantity(v, senmlUnit) };
  }
}
