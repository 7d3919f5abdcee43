/**
 * A submersible well pump, fed from the battery bus or straight from its own PV array. Flow
 * follows the total dynamic head (core's hydraulics) along a simple falling pump curve, and for
 * a PV-direct pump the power the array gives; current follows the hydraulic load. With no water
 * over the intake the pump runs dry: no flow and a light, unloaded motor current, until the well
 * has recovered enough to prime it again.
 */
import {
  hazenWilliamsHeadLossMetres,
  totalDynamicHeadMetres,
  waterPowerWatts,
} from '@wellkept/core';
import type { Well, WellCondition } from './well.js';

/** Height from the well head up to the tank inlet, metres (a typical install). */
const RISE_TO_TANK_METRES = 4;
/** Drop pipe: 1¼-inch plastic, inside diameter 32 mm, C = 140. */
const DROP_PIPE = { insideDiameterMetres: 0.032, roughnessC: 140, extraLengthMetres: 30 };
/** Current of a pump spinning in air, as a share of rated. */
const DRY_CURRENT_SHARE = 0.38;
/** Water over the intake needed to prime again after running dry, metres. */
const REPRIME_METRES = 1.5;
/**
 * PV-direct pump controller: starts above this share of rated power, stops below the next. Below
 * about a third of its power a helical-rotor pump turns too slowly to lift water up the well
 * at a useful rate, so controllers hold it off.
 */
const START_SHARE = 0.35;
const STOP_SHARE = 0.3;
/** Share of rated power that only turns the pump against the head (no flow yet). */
const NO_FLOW_SHARE = 0.1;

export interface WellPumpSpec {
  key: string;
  supply: 'battery' | 'pv_direct';
  ratedCurrentA: number;
  ratedFlowM3s: number;
}

export interface WellPumpStep {
  running: boolean;
  flowCubicMetresPerSecond: number;
  /** Motor current (PV-direct: at the pump controller's input), amperes. */
  amps: number;
  /** Electrical power, watts. */
  watts: number;
}

export class WellPump {
  private dry = false;
  private pvRunning = false;
  readonly designHeadMetres: number;

  constructor(
    readonly spec: WellPumpSpec,
    readonly well: Well,
    /** Supply voltage at rated current (bus nominal, or the array's maximum-power voltage). */
    readonly ratedVolts: number,
  ) {
    const column = Math.max(well.spec.pumpSettingM - well.spec.staticLevelM, 1);
    this.designHeadMetres = this.headMetres(
      well.spec.staticLevelM + 0.25 * column,
      spec.ratedFlowM3s,
    );
  }

  get ratedWatts(): number {
    return this.spec.ratedCurrentA * this.ratedVolts;
  }

  /** Total dynamic head at a depth to water and a flow, metres. */
  headMetres(depthToWaterMetres: number, flow: number): number {
    return totalDynamicHeadMetres({
      staticDepthToWaterMetres: depthToWaterMetres,
      drawdownMetres: 0,
      riseToDischargeMetres: RISE_TO_TANK_METRES,
      frictionHeadMetres: hazenWilliamsHeadLossMetres(
        this.well.spec.pumpSettingM + DROP_PIPE.extraLengthMetres,
        flow,
        DROP_PIPE.roughnessC,
        DROP_PIPE.insideDiameterMetres,
      ),
    });
  }

  /**
   * One step. `called` is the float's call for water; `availableWatts` the array's power for a
   * PV-direct pump (ignored on the battery bus); `busVolts` the battery voltage for a battery
   * pump; `allowed` false while the low-voltage disconnect holds the loads off.
   */
  step(
    called: boolean,
    options: { availableWatts?: number; busVolts?: number; allowed?: boolean },
    condition: WellCondition,
    dtSeconds: number,
  ): WellPumpStep {
    const pvDirect = this.spec.supply === 'pv_direct';
    let running = called && options.allowed !== false;
    let powerShare = 1;
    if (pvDirect) {
      const share = (options.availableWatts ?? 0) / this.ratedWatts;
      this.pvRunning = this.pvRunning ? share >= STOP_SHARE : share >= START_SHARE;
      running = running && this.pvRunning;
      powerShare = Math.min(share, 1.1);
    }
    if (!running) {
      this.well.step(0, condition, dtSeconds);
      return { running: false, flowCubicMetresPerSecond: 0, amps: 0, watts: 0 };
    }
    if (this.dry) {
      this.dry = this.well.depthToWaterMetres > this.well.intakeDepthMetres - REPRIME_METRES;
    } else {
      this.dry = !this.well.hasWaterAtIntake();
    }
    const volts = pvDirect ? this.ratedVolts : (options.busVolts ?? this.ratedVolts);
    if (this.dry) {
      this.well.step(0, condition, dtSeconds);
      const watts = DRY_CURRENT_SHARE * this.ratedWatts * (pvDirect ? Math.min(powerShare, 1) : 1);
      return { running: true, flowCubicMetresPerSecond: 0, amps: watts / volts, watts };
    }
    const rated = this.spec.ratedFlowM3s;
    const head = this.headMetres(this.well.depthToWaterMetres, rated);
    const curve = Math.min(
      1.15,
      Math.max(0.3, 1 - (0.8 * (head - this.designHeadMetres)) / this.designHeadMetres),
    );
    const powerFlow = pvDirect
      ? Math.min(1.1, Math.max(0, (powerShare - NO_FLOW_SHARE) / (1 - NO_FLOW_SHARE)))
      : 1;
    const flow = rated * curve * powerFlow;
    this.well.step(flow, condition, dtSeconds);
    let watts: number;
    if (pvDirect) {
      watts = Math.min(powerShare, 1.1) * this.ratedWatts;
    } else {
      const load = waterPowerWatts(flow, head) / waterPowerWatts(rated, this.designHeadMetres);
      watts = this.ratedWatts * (0.8 + 0.2 * load);
    }
    return { running: true, flowCubicMetresPerSecond: flow, amps: watts / volts, watts };
  }
}
