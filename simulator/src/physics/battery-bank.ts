/**
 * A battery bank: charge held in amp-hours, rest voltage from the chemistry's curve (core), an
 * internal resistance that makes the terminal voltage sag under load and rise under charge, a
 * charge-acceptance term that grows as the bank fills (why the current tapers in absorption),
 * temperature that lags the air, and capacity that fades with throughput.
 *
 * The charge bookkeeping is exact: every step stores `current × efficiency × dt` when charging
 * and removes `current × dt` when discharging, and the controller never offers more than the
 * bank can take, so amp-hours in minus out always equals the change in charge.
 */
import {
  type BatteryBankConfig,
  cellsInSeries,
  defaultChargeEfficiency,
  restVoltsAtReferenceTemperature,
  restVoltsFromSoc,
} from '@wellkept/core';

/** Internal resistance of one cell × its capacity, Ω·Ah (connections included). */
const RESISTANCE_OHM_AMP_HOURS = { lead: 0.3, lifepo4: 0.12 } as const;
/** Charge-acceptance resistance scale per cell × capacity, Ω·Ah (see {@link BatteryBank.acceptOhms}). */
const ACCEPTANCE_OHM_AMP_HOURS = { lead: 0.66, lifepo4: 0.05 } as const;
/** Capacity lost over the rated cycle life, as a fraction, and the cycle life in full cycles. */
const END_OF_LIFE_FADE = 0.2;
const CYCLE_LIFE = { lead: 1200, lifepo4: 4000 } as const;
/** Thermal time constant of a bank in its enclosure, seconds. */
const THERMAL_SECONDS = 8 * 3600;

export interface BatteryCondition {
  /** Remaining share of rated capacity from age, 0–1 (1 new). */
  health: number;
  /** Multiplier on internal resistance (1 new). */
  resistanceFactor: number;
  /**
   * Self-discharge inside the bank, amperes: negligible when healthy, real in a sulfated bank
   * or one with a failing cell. The current sensor does not see it.
   */
  leakAmps: number;
}

export class BatteryBank {
  readonly config: BatteryBankConfig;
  readonly cells: number;
  readonly efficiency: number;
  /** Charge held, amp-hours. */
  chargeAmpHours: number;
  temperatureCelsius: number;
  /** Amp-hours through the bank since the simulation began (for fade). */
  throughputAmpHours = 0;
  /** Condition from age (a fault can make it worse). */
  condition: BatteryCondition = { health: 1, resistanceFactor: 1, leakAmps: 0 };
  /** Charge lost to self-discharge since the start, amp-hours. */
  leakedAmpHours = 0;
  /** Charge lost with fading capacity since the start, amp-hours. */
  fadedAmpHours = 0;
  private readonly family: 'lead' | 'lifepo4';

  constructor(config: BatteryBankConfig, initialSocFraction: number, temperatureCelsius: number) {
    this.config = config;
    this.cells = cellsInSeries(config);
    this.efficiency = defaultChargeEfficiency(config);
    this.family = config.chemistry === 'lifepo4' ? 'lifepo4' : 'lead';
    this.chargeAmpHours = initialSocFraction * config.capacityAmpHours;
    this.temperatureCelsius = temperatureCelsius;
  }

  /** What the bank can hold now: rated × age condition × throughput fade, amp-hours. */
  get capacityAmpHours(): number {
    const cycles = this.throughputAmpHours / 2 / this.config.capacityAmpHours;
    const fade = Math.min(0.5, (END_OF_LIFE_FADE * cycles) / CYCLE_LIFE[this.family]);
    return this.config.capacityAmpHours * this.condition.health * (1 - fade);
  }

  get socFraction(): number {
    return Math.min(1, Math.max(0, this.chargeAmpHours / this.capacityAmpHours));
  }

  /** Open-circuit (rested) voltage at the bank's charge and temperature, volts. */
  restVolts(): number {
    const atReference = restVoltsFromSoc(this.config, this.socFraction);
    // Core converts a reading at T to the curve's temperature; the correction is linear, so
    // the reading at T is the reference value minus the same correction.
    const corrected = restVoltsAtReferenceTemperature(this.config, atReference, {
      temperatureCelsius: this.temperatureCelsius,
    });
    return atReference - (corrected - atReference);
  }

  /** Ohmic resistance of the bank, Ω: higher when cold, when aged, and when nearly empty. */
  resistanceOhms(): number {
    const perCell = RESISTANCE_OHM_AMP_HOURS[this.family] / this.config.capacityAmpHours;
    const cold = 1 + 0.015 * Math.max(0, 25 - this.temperatureCelsius);
    const empty = 1 + 1.5 * (1 - this.socFraction) ** 3;
    return perCell * this.cells * cold * empty * this.condition.resistanceFactor;
  }

  /**
   * Resistance to taking charge that rises as the bank fills (polarisation and gassing in
   * lead-acid, the knee in LiFePO4), Ω. It is what tapers the current when the controller holds
   * a constant voltage.
   */
  private acceptOhms(): number {
    const perCell = ACCEPTANCE_OHM_AMP_HOURS[this.family] / this.capacityAmpHours;
    const margin = this.family === 'lead' ? 0.02 : 0.005;
    return (perCell * this.cells) / (1 - this.socFraction + margin);
  }

  /** Terminal voltage while `amps` flow (positive = charging), volts. */
  terminalVolts(amps: number): number {
    const ohmic = amps * this.resistanceOhms();
    return this.restVolts() + ohmic + (amps > 0 ? amps * this.acceptOhms() : 0);
  }

  /**
   * The charging current at which the terminal voltage equals `volts` (what a controller
   * holding that voltage pushes in), limited to what fits in the bank within `dtSeconds`.
   */
  currentAtVolts(volts: number, dtSeconds: number): number {
    const headroom = volts - this.restVolts();
    if (headroom <= 0) return 0;
    const amps = headroom / (this.resistanceOhms() + this.acceptOhms());
    return Math.min(amps, this.roomAmps(dtSeconds));
  }

  /** The most charging current the bank can store in `dtSeconds` without going over full, A. */
  roomAmps(dtSeconds: number): number {
    const room = Math.max(0, this.capacityAmpHours - this.chargeAmpHours);
    return (room * 3600) / (this.efficiency * dtSeconds);
  }

  /** The most discharge current available for `dtSeconds` before the bank is empty, A. */
  availableAmps(dtSeconds: number): number {
    return (Math.max(0, this.chargeAmpHours) * 3600) / dtSeconds;
  }

  /**
   * Moves charge: `amps` positive into the bank, negative out, for `dtSeconds`; then the bank's
   * own self-discharge.
   */
  flow(amps: number, dtSeconds: number): void {
    const ampHours = (amps * dtSeconds) / 3600;
    this.chargeAmpHours += ampHours > 0 ? ampHours * this.efficiency : ampHours;
    this.throughputAmpHours += Math.abs(ampHours);
    const leak = Math.min(
      (this.condition.leakAmps * dtSeconds) / 3600,
      Math.max(0, this.chargeAmpHours),
    );
    this.chargeAmpHours -= leak;
    this.leakedAmpHours += leak;
    // Capacity that fades (age, or a fault) takes the charge it held with it.
    const capacity = this.capacityAmpHours;
    if (this.chargeAmpHours > capacity) {
      this.fadedAmpHours += this.chargeAmpHours - capacity;
      this.chargeAmpHours = capacity;
    }
  }

  /** The bank's temperature follows the air with a lag, warmed a little by heavy current. */
  settleTemperature(airCelsius: number, amps: number, dtSeconds: number): void {
    const heating = (amps * amps * this.resistanceOhms()) / (this.cells * 40);
    const target = airCelsius + heating;
    const k = 1 - Math.exp(-dtSeconds / THERMAL_SECONDS);
    this.temperatureCelsius += (target - this.temperatureCelsius) * k;
  }
}
