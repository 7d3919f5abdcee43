/**
 * A storage tank or cistern: the water it holds, its level through core's tank geometry, and
 * what it took in, gave out and spilled, so the water balance can be checked at any time.
 */
import {
  type TankConfig,
  levelFromTankVolume,
  tankCapacityCubicMetres,
  tankHeightMetres,
} from '@wellkept/core';

export class StorageTank {
  readonly capacityCubicMetres: number;
  readonly heightMetres: number;
  volumeCubicMetres: number;
  /** Running totals since the start, m³. */
  inflowCubicMetres = 0;
  useCubicMetres = 0;
  overflowCubicMetres = 0;

  constructor(
    readonly config: TankConfig,
    initialFraction: number,
  ) {
    this.capacityCubicMetres = tankCapacityCubicMetres(config.geometry);
    this.heightMetres = tankHeightMetres(config.geometry);
    this.volumeCubicMetres = initialFraction * this.capacityCubicMetres;
  }

  /** Water depth above the floor, metres. */
  depthMetres(): number {
    const reading = levelFromTankVolume(this.config, this.volumeCubicMetres) ?? 0;
    return reading + (this.config.sensorOffsetMetres ?? 0);
  }

  /** The level sensor's reading, metres (depth minus the sensor offset). */
  levelReadingMetres(): number {
    return levelFromTankVolume(this.config, this.volumeCubicMetres) ?? 0;
  }

  /** Water in; anything above the top runs out of the overflow. */
  fill(cubicMetres: number): void {
    this.inflowCubicMetres += cubicMetres;
    this.volumeCubicMetres += cubicMetres;
    if (this.volumeCubicMetres > this.capacityCubicMetres) {
      this.overflowCubicMetres += this.volumeCubicMetres - this.capacityCubicMetres;
      this.volumeCubicMetres = this.capacityCubicMetres;
    }
  }

  /** Takes up to `cubicMetres` out; returns what was there to take. */
  draw(cubicMetres: number): number {
    const taken = Math.min(Math.max(cubicMetres, 0), this.volumeCubicMetres);
    this.volumeCubicMetres -= taken;
    this.useCubicMetres += taken;
    return taken;
  }
}

/**
 * A float switch on a tank that calls its pump: contacts closed (pump on) once the water falls
 * to the low mark, open (pump off) once it rises to the high mark, unchanged in between (the
 * tether's differential). `opens_on_high` floats have a short differential near the top;
 * `closes_on_low` floats a long one.
 */
export class FloatSwitch {
  closed: boolean;

  constructor(
    readonly key: string,
    readonly tank: StorageTank,
    readonly pumpKey: string,
    readonly highMarkMetres: number,
    readonly lowMarkMetres: number,
  ) {
    this.closed = tank.depthMetres() < highMarkMetres;
  }

  /** The contacts' state from the water depth. */
  sense(): boolean {
    const depth = this.tank.depthMetres();
    if (depth >= this.highMarkMetres) this.closed = false;
    else if (depth <= this.lowMarkMetres) this.closed = true;
    return this.closed;
  }
}
