/**
 * A booster pump with a pressure switch and a bladder (pressure) tank. The air in the tank
 * obeys Boyle's law (isothermal, absolute pressures), so the water it holds sets the pressure:
 *   p_abs = air content / (tank volume − water volume),
 * with the air content fixed by the precharge (precharge_abs × tank volume). The switch starts
 * the pump at the cut-in pressure and stops it at the cut-out; the house draws from the tank.
 * A tank that has lost its air charge holds almost nothing between cut-in and cut-out, so the
 * pump starts every few seconds while a tap runs: short cycling.
 */
import { STANDARD_ATMOSPHERE_PASCALS } from '@wellkept/core';

/** Longest integration step inside the pressure system, seconds. */
const SUB_STEP_SECONDS = 1;
/** Step while the pump is off and no tap is open (nothing changes), seconds. */
const IDLE_STEP_SECONDS = 5;
/** A lost precharge: the share of the air charge left in the tank. */
export const LOST_AIR_SHARE = 0.04;

export interface PressureTankSpec {
  key: string;
  capacityM3: number;
  prechargePa: number;
  cutInPa: number;
  cutOutPa: number;
}

export interface BoosterSpec {
  key: string;
  ratedCurrentA: number;
  ratedFlowM3s: number;
}

/** What happened over one outer step. */
export interface PressureStep {
  /** Water the booster took from its supply tank, m³. */
  pumpedCubicMetres: number;
  /** Water delivered to the house, m³. */
  deliveredCubicMetres: number;
  /** Booster energy taken from the bus, amp-seconds at bus voltage. */
  ampSeconds: number;
  /** Seconds the booster ran. */
  runSeconds: number;
  /** Times (epoch seconds) at which the booster switched, with the new state. */
  switches: { t: number; running: boolean }[];
}

export class PressureSystem {
  /** Water in the pressure tank, m³. */
  waterCubicMetres: number;
  running = false;
  /** Motor current while running, amperes (for readings). */
  amps = 0;
  readonly atmosphericPascals: number;

  constructor(
    readonly tank: PressureTankSpec,
    readonly booster: BoosterSpec,
    elevationMetres: number,
    /** Nominal bus voltage: the motor draws more current when the bus sags below it. */
    readonly nominalVolts: number,
  ) {
    this.atmosphericPascals =
      STANDARD_ATMOSPHERE_PASCALS * (1 - 2.25577e-5 * Math.max(elevationMetres, 0)) ** 5.25588;
    // Start half-way between cut-in and cut-out.
    this.waterCubicMetres = this.waterAtGauge((tank.cutInPa + tank.cutOutPa) / 2, 1);
  }

  /** Air content of the tank (absolute pascals × m³) for a share of the normal air charge. */
  airContent(airShare: number): number {
    return (this.tank.prechargePa + this.atmosphericPascals) * this.tank.capacityM3 * airShare;
  }

  /** Gauge pressure at the water volume held, pascals (0 once the tank is drained). */
  gaugePascals(airShare: number): number {
    return this.gaugeAt(this.waterCubicMetres, airShare);
  }

  private gaugeAt(water: number, airShare: number): number {
    if (water <= 0) return 0;
    const air = Math.max(this.tank.capacityM3 - water, 1e-6);
    return Math.max(0, this.airContent(airShare) / air - this.atmosphericPascals);
  }

  /** Water held at a gauge pressure (inverse of {@link gaugePascals}), m³. */
  waterAtGauge(gaugePa: number, airShare: number): number {
    const air = this.airContent(airShare) / (gaugePa + this.atmosphericPascals);
    return Math.max(0, this.tank.capacityM3 - air);
  }

  /**
   * Advances `dtSeconds` from `startT`. `demand(t)` gives the house's draw in m³/s,
   * `supplyCubicMetres` is the water in the tank the booster draws from, `busVolts` the battery
   * voltage, `allowed` false while the low-voltage disconnect holds the loads off.
   */
  step(
    startT: number,
    dtSeconds: number,
    demand: (t: number) => number,
    supplyCubicMetres: number,
    busVolts: number,
    allowed: boolean,
    airShare: number,
  ): PressureStep {
    const result: PressureStep = {
      pumpedCubicMetres: 0,
      deliveredCubicMetres: 0,
      ampSeconds: 0,
      runSeconds: 0,
      switches: [],
    };
    const cutIn = this.tank.cutInPa;
    const cutOut = this.tank.cutOutPa;
    let supply = supplyCubicMetres;
    let elapsed = 0;
    while (elapsed < dtSeconds) {
      const t = startT + elapsed;
      const want = demand(t);
      // Nothing moves while the pump is off and no tap is open: skip to the end of the step.
      if (!this.running && want <= 0) {
        const next = Math.min(dtSeconds - elapsed, IDLE_STEP_SECONDS);
        elapsed += next;
        continue;
      }
      const h = Math.min(SUB_STEP_SECONDS, dtSeconds - elapsed);
      const gauge = this.gaugeAt(this.waterCubicMetres, airShare);
      const shouldRun = allowed && (this.running ? gauge < cutOut : gauge <= cutIn);
      if (shouldRun !== this.running) {
        this.running = shouldRun;
        result.switches.push({ t: t + h / 2, running: shouldRun });
      }
      let pumped = 0;
      if (this.running) {
        const load = Math.min(1, gauge / cutOut);
        const flow = this.booster.ratedFlowM3s * (1.15 - 0.3 * load);
        pumped = Math.min(flow * h, supply);
        supply -= pumped;
        const wet = pumped > 0;
        // Dry (an empty supply tank) the motor spins light; loaded it follows the pressure.
        this.amps = this.booster.ratedCurrentA * (wet ? 0.75 + 0.3 * load : 0.38);
        this.amps *= busVolts > 0 ? Math.min(1.3, Math.max(0.8, this.nominalVolts / busVolts)) : 1;
        result.ampSeconds += this.amps * h;
        result.runSeconds += h;
      } else {
        this.amps = 0;
      }
      const available = this.waterCubicMetres + pumped;
      const delivered = Math.min(want * h, available);
      this.waterCubicMetres = available - delivered;
      // The tank cannot hold more than its air allows at the pump's shut-off head.
      const ceiling = this.waterAtGauge(cutOut * 1.4, airShare);
      if (this.waterCubicMetres > ceiling) {
        // The pump cannot push past its shut-off head: the surplus never left the supply tank.
        const excess = this.waterCubicMetres - ceiling;
        pumped -= excess;
        supply += excess;
        this.waterCubicMetres = ceiling;
      }
      result.pumpedCubicMetres += pumped;
      result.deliveredCubicMetres += delivered;
      elapsed += h;
    }
    if (!this.running) this.amps = 0;
    return result;
  }
}
