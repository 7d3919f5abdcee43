/**
 * A PV array: the power it can give now (core's plane-of-array irradiance and expected output,
 * times the weather's clearness) and the voltage and current a gateway would read at its
 * terminals for the power actually drawn.
 */
import { type PvArrayConfig, expectedPvWatts, planeOfArrayIrradiance } from '@wellkept/core';
import type { SunNow } from './sun-track.js';

export class PvArray {
  /** Voltage at the maximum power point, volts. */
  readonly mppVolts: number;
  readonly openCircuitVolts: number;
  /** What the array could give at its maximum power point this step, watts. */
  availableWatts = 0;
  /** What was drawn from it this step, watts. */
  drawnWatts = 0;
  private irradiance = 0;

  constructor(
    readonly config: PvArrayConfig,
    mppVolts: number,
  ) {
    this.mppVolts = mppVolts;
    this.openCircuitVolts = mppVolts * 1.22;
  }

  /** Sets the available power for the sun and the sky's clearness (0–1). */
  illuminate(sun: SunNow, clearness: number): number {
    const ghi = sun.clearSkyGhi * clearness;
    this.irradiance = planeOfArrayIrradiance(ghi, sun, this.config);
    this.availableWatts = expectedPvWatts(this.config, this.irradiance);
    return this.availableWatts;
  }

  /** Terminal voltage: near the maximum power point when harvested, towards open circuit when not. */
  volts(): number {
    if (this.irradiance < 1) return 0;
    // Open-circuit voltage rises with the log of irradiance; it is there from first light.
    const light = Math.min(1, Math.log1p(this.irradiance / 10) / Math.log1p(100));
    const voc = this.openCircuitVolts * (0.75 + 0.25 * light);
    const used = this.availableWatts > 0 ? Math.min(1, this.drawnWatts / this.availableWatts) : 0;
    const vmp = Math.min(voc, this.mppVolts * (0.9 + 0.1 * light));
    return vmp + (voc - vmp) * (1 - used);
  }

  amps(): number {
    const v = this.volts();
    return v > 0 ? this.drawnWatts / v : 0;
  }
}
