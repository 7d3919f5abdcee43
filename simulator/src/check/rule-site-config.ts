/**
 * A simulator site as core's rule evaluators see it (the same equipment the database holds).
 */
import type { FloatSwitchConfig, RulePumpConfig, RuleTankConfig, SiteConfig } from '@wellkept/core';
import { tankConfig } from '../physics/site-simulation.js';
import type { SiteSpec } from '../site-spec.js';

export function ruleSiteConfig(site: SiteSpec, reportingIntervalSeconds: number): SiteConfig {
  const pvArrays = site.pvArrays.map((a) => ({
    key: a.key,
    ratedWatts: a.ratedW,
    tiltDegrees: 30,
    azimuthDegrees: site.latitude >= 0 ? 180 : 0,
  }));
  const pumps: RulePumpConfig[] = site.pumps.map((p) => ({
    key: p.key,
    role: p.kind,
    ratedCurrentAmps: p.ratedCurrentA,
    ratedFlowCubicMetresPerSecond: p.ratedFlowM3s ?? null,
    ratedWatts: p.motorPowerW ?? null,
    rebuildIntervalHours: p.rebuildIntervalH ?? null,
    fillsTankKey: p.fillsTank ?? null,
    supply: p.supply,
    pvArrayKey: site.pvArrays.find((a) => a.pump === p.key)?.key ?? null,
    supplyVolts: site.battery?.nominalVoltageV ?? null,
  }));
  const tanks: RuleTankConfig[] = site.tanks
    .filter((t) => t.kind === 'storage')
    .map((t) => tankConfig(t));
  // Both float wirings of the demo close their contacts to call for water (see FloatSwitch).
  const floatSwitches: FloatSwitchConfig[] = site.floats.map((f) => ({
    key: f.key,
    tankKey: f.tank,
    pumpKey: f.pump,
    logic: 'closed_calls',
  }));
  return {
    timeZone: site.timeZone,
    location: {
      latitudeDegrees: site.latitude,
      longitudeDegrees: site.longitude,
      elevationMetres: site.elevationM,
    },
    battery: site.battery
      ? {
          chemistry: site.battery.chemistry,
          nominalVolts: site.battery.nominalVoltageV,
          capacityAmpHours: site.battery.capacityAh,
        }
      : null,
    pvArrays,
    pumps,
    tanks,
    floatSwitches,
    gateways: [{ id: site.gatewayId, reportingIntervalSeconds }],
  };
}
