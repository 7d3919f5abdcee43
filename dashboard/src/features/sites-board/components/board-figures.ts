import {
  formatQuantity,
  formatVolume,
  type DisplayQuantity,
  type UnitSystem,
} from '@wellkept/core';
import type { FleetSite } from '../api/get-fleet';

/** The figures a board row shows, in the person's units (through core's formatters). */
export function boardFigures(site: FleetSite, system: UnitSystem) {
  const charge: DisplayQuantity | null =
    site.battery && site.battery.stateOfChargePercent !== null
      ? formatQuantity(site.battery.stateOfChargePercent, '%', { fractionDigits: 0 })
      : null;
  const chargeBand =
    site.battery && site.battery.confidence !== 'good'
      ? `${Math.round(site.battery.lowPercent)}–${Math.round(site.battery.highPercent)} %`
      : null;
  const stored = site.water
    ? formatVolume(site.water.storedM3, system, { fractionDigits: 0 })
    : null;
  const fullness = site.water
    ? formatQuantity(site.water.percent, '%', { fractionDigits: 0 })
    : null;
  const daysLeft =
    site.water && site.water.daysLeft !== null
      ? formatQuantity(site.water.daysLeft, site.water.daysLeft === 1 ? 'day' : 'days', {
          fractionDigits: site.water.daysLeft < 10 ? 1 : 0,
        })
      : null;
  return { charge, chargeBand, stored, fullness, daysLeft };
}
