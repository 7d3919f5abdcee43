import {
  clearSkyPvWatts,
  restVoltsFromSoc,
  type AlertKind,
  type BatteryBankConfig,
  type OutgoingReading,
} from '@wellkept/core';

/**
 * A small homestead, simulated minute by minute from core's own physics (clear-sky PV output,
 * the AGM rest-voltage curve): the charging array, the 24 V bank, a battery-run well pump
 * filling a 2 m × 2 m upright tank under a pump-up float, and the household drawing water in
 * the day. One fault at a time can be switched on for a window; each one is the signature of
 * one alert kind, the way the product brief describes it. Deterministic (no randomness), so a
 * test sees the same series every run. Matches `createSite` in rules-harness.ts.
 */
export type HomesteadFault = AlertKind;

export const HOMESTEAD_LOCATION = {
  latitudeDegrees: 35.4,
  longitudeDegrees: -107.9,
  elevationMetres: 2000,
};
const ARRAY = { key: 'house', ratedWatts: 1600, tiltDegrees: 30, azimuthDegrees: 180 };
const BANK: BatteryBankConfig = { chemistry: 'agm', nominalVolts: 24, capacityAmpHours: 400 };
const TANK_AREA = Math.PI; // 2 m across: π m² per metre of level
const PUMP_FLOW = 0.0004; // m³/s
const PUMP_AMPS = 7.4; // rated 8 A
const FLOAT_CALLS_BELOW = 1.0; // m
const FLOAT_RELEASES_AT = 1.8; // m
const PV_VOLTS = 34;

export interface FaultWindow {
  kind: HomesteadFault;
  startT: number;
  endT: number;
}

export class Homestead {
  t: number;
  level: number;
  running = false;
  private calling = false;
  /** Battery state of charge, 0–1 (kept simple: charges in sun, loads at night). */
  soc = 0.92;
  private readonly faults: FaultWindow[];

  constructor(startT: number, options: { level?: number; faults?: FaultWindow[] } = {}) {
    this.t = startT;
    this.level = options.level ?? 1.4;
    this.faults = options.faults ?? [];
  }

  fault(kind: HomesteadFault, t = this.t): boolean {
    return this.faults.some((f) => f.kind === kind && f.startT <= t && t < f.endT);
  }

  /** Advances one reporting step (60 s) and returns what the gateway reads at its end. */
  step(seconds = 60): OutgoingReading[] {
    this.t += seconds;
    const t = this.t;
    const clearSky = clearSkyPvWatts(ARRAY, t, HOMESTEAD_LOCATION);
    const day = clearSky > 50;
    const hour = (((t / 3600 - 7) % 24) + 24) % 24; // local solar-ish hour at UTC−7

    // Water: the household draws in the day; the float calls the pump.
    const use = this.fault('water_low') ? 1.6 : 0.5; // m³ per day
    if (hour >= 6 && hour < 22) this.level -= ((use / 16 / 3600) * seconds) / TANK_AREA;
    if (this.level < FLOAT_CALLS_BELOW) this.calling = true;
    if (this.level >= FLOAT_RELEASES_AT) this.calling = false;
    let floatClosed = this.calling;
    let running = this.calling;
    let amps = PUMP_AMPS;
    let moving = true;
    if (this.fault('water_low')) running = floatClosed = false; // the well cannot keep up
    if (this.fault('float_stuck')) {
      floatClosed = true;
      running = true;
    }
    if (this.fault('dry_run')) {
      // The float calls and the pump runs, but draws little and moves nothing; once the well
      // recovers the same call fills the tank normally.
      this.calling = true;
      running = floatClosed = true;
      amps = 2.6;
      moving = false;
    }
    if (this.fault('short_cycling')) {
      // 40 s on, 80 s off: 30 starts an hour of runs under a minute.
      running = floatClosed = t % 120 < 40;
    }
    this.running = running;
    if (running && moving)
      this.level = Math.min(this.level + (PUMP_FLOW * seconds) / TANK_AREA, 2.0);

    // Energy: the array charges by day (70 % of clear sky), loads draw day and night.
    const noCharge = this.fault('no_charge');
    const pvWatts = noCharge ? 0 : clearSky * 0.7;
    const loadWatts =
      60 + (running ? amps * 24 : 0) + (this.fault('overnight_sag') && !day ? 300 : 0);
    const netWatts = pvWatts - loadWatts;
    this.soc = Math.min(0.95, Math.max(0.05, this.soc + (netWatts * seconds) / 3600 / (400 * 24)));
    // A drained bank; when the fault ends a generator run has recharged it.
    if (this.fault('low_charge')) this.soc = Math.min(this.soc, 0.3);
    else if (this.fault('low_charge', t - seconds)) this.soc = 0.9;
    const batteryAmps = netWatts / 25;
    const charging = pvWatts > 200 && this.soc >= 0.9;
    const volts = charging ? 27.4 : restVoltsFromSoc(BANK, this.soc) + batteryAmps * 0.01;
    const stage = noCharge ? 'off' : charging ? 'absorption' : pvWatts > 50 ? 'bulk' : 'off';

    const readings: OutgoingReading[] = [
      { name: 'battery/voltage', t, value: round(volts, 3) },
      { name: 'battery/current', t, value: round(batteryAmps, 2) },
      { name: 'pv/house/voltage', t, value: pvWatts > 0 ? PV_VOLTS : 0 },
      { name: 'pv/house/current', t, value: round(pvWatts / PV_VOLTS, 2) },
      { name: 'controller/stage', t, value: stage },
      { name: 'pump/well/running', t, value: running },
      { name: 'pump/well/current', t, value: running ? amps : 0 },
      { name: 'tank/main/level', t, value: round(this.level, 4) },
      { name: 'float/main-float/closed', t, value: floatClosed },
    ];
    return readings;
  }
}

function round(v: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(v * f) / f;
}
