/**
 * An MPPT charge controller: takes the power the battery-charging arrays can give, serves the
 * loads first, and charges the bank in three stages with core's temperature-compensated
 * setpoints. Bulk passes everything the arrays give; absorption holds the absorption voltage
 * until the current tails off or the time limit passes; float holds the float voltage. At night
 * it reports `off`, and the next morning starts again in bulk.
 */
import { type ControllerStage, chargeSetpoints } from '@wellkept/core';
import type { BatteryBank } from './battery-bank.js';

const CONVERSION_EFFICIENCY = 0.96;
/** Array power below which the controller sleeps, watts. */
const WAKE_WATTS = 2;

export interface ControllerStep {
  stage: ControllerStage;
  /** Current the controller puts on the battery bus, amperes. */
  outputAmps: number;
  /** Power taken from the arrays, watts. */
  arrayWatts: number;
  /**
   * The bus voltage the controller holds while it regulates (absorption or float with power to
   * spare), volts; null when it passes all it has (bulk, or too little sun to hold the setpoint).
   */
  regulatedVolts: number | null;
}

export class ChargeController {
  stage: ControllerStage = 'off';
  private absorptionSeconds = 0;
  private readonly absorptionLimitSeconds: number;
  private readonly tailFraction: number;

  constructor(private readonly bank: BatteryBank) {
    const lithium = bank.config.chemistry === 'lifepo4';
    this.absorptionLimitSeconds = (lithium ? 0.5 : 2.5) * 3600;
    this.tailFraction = lithium ? 0.05 : 0.02;
  }

  /**
   * One step. `availableWatts` is what the arrays could give at their maximum power point,
   * `loadAmps` what the loads on the battery bus draw. `failed` models a dead controller.
   */
  step(
    availableWatts: number,
    loadAmps: number,
    dtSeconds: number,
    failed: boolean,
  ): ControllerStep {
    if (failed || availableWatts < WAKE_WATTS) {
      this.stage = 'off';
      this.absorptionSeconds = 0;
      return { stage: 'off', outputAmps: 0, arrayWatts: 0, regulatedVolts: null };
    }
    if (this.stage === 'off') this.stage = 'bulk';
    const bank = this.bank;
    const setpoints = chargeSetpoints(bank.config, {
      temperatureCelsius: bank.temperatureCelsius,
    });
    const busVolts = bank.terminalVolts(0);
    const maxAmps = (availableWatts * CONVERSION_EFFICIENCY) / busVolts;
    const room = bank.roomAmps(dtSeconds);

    let batteryAmps: number;
    let regulatedVolts: number | null = null;
    if (this.stage === 'bulk') {
      const limit = bank.currentAtVolts(setpoints.absorptionVolts, dtSeconds);
      batteryAmps = Math.min(maxAmps - loadAmps, room);
      if (batteryAmps >= limit) {
        this.stage = 'absorption';
        batteryAmps = limit;
        regulatedVolts = setpoints.absorptionVolts;
      }
    } else {
      const target = this.stage === 'absorption' ? setpoints.absorptionVolts : setpoints.floatVolts;
      const accepted = bank.currentAtVolts(target, dtSeconds);
      batteryAmps = Math.min(maxAmps - loadAmps, accepted);
      if (batteryAmps >= accepted) regulatedVolts = target;
      if (this.stage === 'absorption' && batteryAmps >= accepted) {
        this.absorptionSeconds += dtSeconds;
        const tail = this.tailFraction * bank.capacityAmpHours;
        if (this.absorptionSeconds >= this.absorptionLimitSeconds || accepted <= tail) {
          this.stage = 'float';
        }
      }
    }
    const outputAmps = Math.max(0, batteryAmps + loadAmps);
    const volts = regulatedVolts ?? bank.terminalVolts(outputAmps - loadAmps);
    return {
      stage: this.stage,
      outputAmps,
      arrayWatts: (outputAmps * volts) / CONVERSION_EFFICIENCY,
      regulatedVolts,
    };
  }
}
