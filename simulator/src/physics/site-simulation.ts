/**
 * One site, simulated: sun and weather, PV arrays, the charge controller and battery bank, well
 * pumps filling storage under their float switches, a booster pump with its pressure tank, the
 * household's water use, and the faults scheduled for the site. `advanceTo` integrates the
 * physics in steps of at most `maxStepSeconds`; `readings` is what a gateway would read at
 * that moment, and `takeSwitchEvents` the switch changes in between (gateways report those as
 * they happen, so a pump run shorter than the reporting interval is not lost).
 */
import {
  type OutgoingReading,
  type TankConfig,
  type TankGeometry,
  levelFromTankVolume,
} from '@wellkept/core';
import { type ScheduledFault, activeFault } from '../faults/fault-kinds.js';
import { RandomStream, seedFromText } from '../random.js';
import type { SiteSpec, TankSpec } from '../site-spec.js';
import { BatteryBank } from './battery-bank.js';
import { ChargeController } from './charge-controller.js';
import { LOST_AIR_SHARE, PressureSystem } from './pressure-system.js';
import { PvArray } from './pv-array.js';
import { FloatSwitch, StorageTank } from './storage-tank.js';
import { SunTrack } from './sun-track.js';
import { WaterUse } from './water-use.js';
import { Weather } from './weather.js';
import { Well } from './well.js';
import { WellPump } from './well-pump.js';

/** Steady loads on the battery bus besides the pumps (lights, fridge, the gateway), W. */
const BASE_LOAD_WATTS = 18;
const EVENING_LOAD_WATTS = 90;
/** Low-voltage disconnect and reconnect, volts per cell. */
const DISCONNECT_VOLTS_PER_CELL = { lead: 1.92, lifepo4: 3.0 } as const;
const RECONNECT_VOLTS_PER_CELL = { lead: 2.1, lifepo4: 3.22 } as const;
/**
 * Aged bank: remaining capacity share, resistance multiplier, and self-discharge as a share of
 * rated capacity per hour (a sulfated bank with a weak cell).
 */
const AGED = { health: 0.35, resistanceFactor: 4, leakPerHour: 0.006 } as const;
/** Demand is integrated in slices of this many seconds on sites without a booster. */
const DEMAND_SLICE_SECONDS = 5;

export interface SimulationOptions {
  /** Epoch seconds at which the simulation starts. */
  startT: number;
  /** Seed for weather, water use and sensor noise. Default: from the site key. */
  seed?: number;
  faults?: readonly ScheduledFault[];
  /** Longest physics step, seconds. Default 60. */
  maxStepSeconds?: number;
  /** Starting state of charge (0–1). Default 0.85. */
  initialSocFraction?: number;
  /** Starting share of storage tanks' capacity. Default 0.7. */
  initialTankFraction?: number;
}

interface WellPumpUnit {
  pump: WellPump;
  well: Well;
  tank: StorageTank | null;
  float: FloatSwitch | null;
  array: PvArray | null;
  running: boolean;
  amps: number;
  flow: number;
}

interface BoosterUnit {
  key: string;
  system: PressureSystem;
  supply: StorageTank | null;
}

/** Running totals for balance checks (tests) and for the summary printed by the CLI. */
export interface SiteLedger {
  /** Amp-hours into the bank (before charge efficiency) and out of it. */
  chargedAmpHours: number;
  dischargedAmpHours: number;
  /** Water pumped out of wells and delivered to the house or the trough, m³. */
  pumpedFromWellsCubicMetres: number;
  deliveredCubicMetres: number;
  /** Water taken but not delivered (no water at the tap when the tank ran dry), m³. */
  unmetDemandCubicMetres: number;
  /** Seconds the low-voltage disconnect held the loads off. */
  disconnectedSeconds: number;
}

export class SiteSimulation {
  t: number;
  readonly site: SiteSpec;
  readonly bank: BatteryBank | null;
  readonly tanks = new Map<string, StorageTank>();
  readonly floats: FloatSwitch[] = [];
  readonly ledger: SiteLedger = {
    chargedAmpHours: 0,
    dischargedAmpHours: 0,
    pumpedFromWellsCubicMetres: 0,
    deliveredCubicMetres: 0,
    unmetDemandCubicMetres: 0,
    disconnectedSeconds: 0,
  };
  private readonly sun: SunTrack;
  private readonly weather: Weather;
  private readonly use: WaterUse;
  private readonly chargingArrays: PvArray[] = [];
  private readonly allArrays: PvArray[] = [];
  private readonly controller: ChargeController | null;
  private readonly wellPumps: WellPumpUnit[] = [];
  private readonly booster: BoosterUnit | null;
  private readonly faults: readonly ScheduledFault[];
  private readonly maxStep: number;
  private readonly noise: RandomStream;
  private readonly nominalVolts: number;
  private readonly family: 'lead' | 'lifepo4';
  private batteryAmps = 0;
  /** Voltage across the bank at the end of the last step, volts. */
  private busVolts = 0;
  private disconnected = false;
  private events: OutgoingReading[] = [];
  private lastFloatStates = new Map<string, boolean>();

  constructor(site: SiteSpec, options: SimulationOptions) {
    this.site = site;
    this.t = options.startT;
    const seed = options.seed ?? seedFromText(site.key);
    this.faults = (options.faults ?? []).filter((f) => f.siteKey === site.key);
    this.maxStep = options.maxStepSeconds ?? 60;
    this.noise = new RandomStream(seed ^ 0x5eed);
    const location = {
      latitudeDegrees: site.latitude,
      longitudeDegrees: site.longitude,
      elevationMetres: site.elevationM,
    };
    this.sun = new SunTrack(location);
    this.weather = new Weather({ seed, ...location, cloudiness: site.cloudiness ?? 0.3 });
    this.use = new WaterUse({
      seed,
      timeZone: site.timeZone,
      dailyCubicMetres: site.waterUse?.dailyCubicMetres ?? 0.6,
      profile: site.waterUse?.profile ?? 'household',
    });
    this.nominalVolts = site.battery?.nominalVoltageV ?? 24;
    this.family = site.battery?.chemistry === 'lifepo4' ? 'lifepo4' : 'lead';
    const air = this.weather.airCelsius(this.t);
    this.bank = site.battery
      ? new BatteryBank(
          {
            chemistry: site.battery.chemistry,
            nominalVolts: site.battery.nominalVoltageV,
            capacityAmpHours: site.battery.capacityAh,
          },
          options.initialSocFraction ?? 0.85,
          air,
        )
      : null;
    this.controller = this.bank ? new ChargeController(this.bank) : null;

    const tankFraction = options.initialTankFraction ?? 0.7;
    for (const spec of site.tanks) {
      if (spec.kind !== 'storage') continue;
      this.tanks.set(spec.key, new StorageTank(tankConfig(spec), tankFraction));
    }
    for (const f of site.floats) {
      const tank = this.tanks.get(f.tank);
      if (!tank) continue;
      // Fill floats stop the pump at 90 % of the tank's volume; a low-calling float lets the
      // tank fall to 45 %. Two pumps on one tank: the second float sits lower, so it only helps
      // when the first lags. Marks are set by volume so a horizontal tank behaves like the rest.
      const order = site.floats.filter((o) => o.tank === f.tank).indexOf(f);
      const highShare = 0.9 - 0.07 * order;
      const lowShare = f.logic === 'closes_on_low' ? 0.45 : highShare - 0.1;
      const depthAt = (share: number) =>
        (levelFromTankVolume(tank.config, share * tank.capacityCubicMetres) ?? 0) +
        (tank.config.sensorOffsetMetres ?? 0);
      const high = depthAt(highShare);
      const low = depthAt(lowShare);
      const sw = new FloatSwitch(f.key, tank, f.pump, high, low);
      this.floats.push(sw);
      this.lastFloatStates.set(f.key, sw.closed);
    }

    for (const a of site.pvArrays) {
      const pumpDirect = a.purpose === 'pump_direct';
      const pump = pumpDirect ? site.pumps.find((p) => p.key === a.pump) : undefined;
      const mpp = pumpDirect
        ? (pump?.motorPowerW ?? 560) / (pump?.ratedCurrentA ?? 7) / 0.85
        : this.nominalVolts * 2.6;
      const array = new PvArray(
        {
          key: a.key,
          ratedWatts: a.ratedW,
          tiltDegrees: 30,
          azimuthDegrees: site.latitude >= 0 ? 180 : 0,
        },
        mpp,
      );
      this.allArrays.push(array);
      if (!pumpDirect) this.chargingArrays.push(array);
    }

    for (const p of site.pumps) {
      if (p.kind !== 'well' || !site.well) continue;
      const rated = p.ratedFlowM3s ?? 1e-4;
      const well = new Well(site.well, rated);
      const array =
        p.supply === 'pv_direct'
          ? (this.allArrays.find(
              (a) => site.pvArrays.find((s) => s.key === a.config.key)?.pump === p.key,
            ) ?? null)
          : null;
      const pump = new WellPump(
        { key: p.key, supply: p.supply, ratedCurrentA: p.ratedCurrentA, ratedFlowM3s: rated },
        well,
        array ? array.mppVolts : this.nominalVolts,
      );
      this.wellPumps.push({
        pump,
        well,
        tank: p.fillsTank ? (this.tanks.get(p.fillsTank) ?? null) : null,
        float: this.floats.find((f) => f.pumpKey === p.key) ?? null,
        array,
        running: false,
        amps: 0,
        flow: 0,
      });
    }

    const boosterSpec = site.pumps.find((p) => p.kind === 'booster');
    const pressureTank = site.tanks.find((t) => t.kind === 'pressure');
    if (boosterSpec && pressureTank && pressureTank.capacityM3 && pressureTank.cutInPa) {
      const system = new PressureSystem(
        {
          key: pressureTank.key,
          capacityM3: pressureTank.capacityM3,
          prechargePa: pressureTank.prechargePa ?? pressureTank.cutInPa - 14_000,
          cutInPa: pressureTank.cutInPa,
          cutOutPa: pressureTank.cutOutPa ?? pressureTank.cutInPa + 138_000,
        },
        {
          key: boosterSpec.key,
          ratedCurrentA: boosterSpec.ratedCurrentA,
          ratedFlowM3s: boosterSpec.ratedFlowM3s ?? 2e-4,
        },
        site.elevationM,
        this.nominalVolts,
      );
      this.booster = {
        key: boosterSpec.key,
        system,
        supply: boosterSpec.drawsFromTank
          ? (this.tanks.get(boosterSpec.drawsFromTank) ?? null)
          : null,
      };
    } else {
      this.booster = null;
    }
  }

  /** The site's gateway id. */
  get gatewayId(): string {
    return this.site.gatewayId;
  }

  /** True when a fault of this kind is active at `t` (for the gateway's own faults too). */
  faultActive(kind: ScheduledFault['kind'], t = this.t): ScheduledFault | undefined {
    return this.faults.length === 0 ? undefined : activeFault(this.faults, kind, t);
  }

  /** Integrates the physics up to `t` (no-op when `t` is not ahead). */
  advanceTo(t: number): void {
    while (this.t < t) {
      const dt = Math.min(this.maxStep, t - this.t);
      this.step(dt);
      this.t += dt;
    }
  }

  /** Water pressure in the booster's pressure tank, gauge pascals, or null without one. */
  pressurePascals(): number | null {
    if (!this.booster) return null;
    return this.booster.system.gaugePascals(this.airShare(this.t));
  }

  private airShare(t: number): number {
    return this.faultActive('bladder_lost_precharge', t) ? LOST_AIR_SHARE : 1;
  }

  private step(dt: number): void {
    const t0 = this.t;
    const mid = t0 + dt / 2;
    // Switch changes inside the step are stamped mid-step: never on a reporting instant, where
    // the snapshot of the same channel already has that time.
    const eventT = mid;
    const sun = this.sun.at(mid);
    const clearness = this.weather.clearness(mid);
    const air = this.weather.airCelsius(mid);
    for (const a of this.allArrays) {
      a.illuminate(sun, clearness);
      a.drawnWatts = 0;
    }
    const allowed = !this.disconnected;
    const busVolts = this.bank ? this.bankVolts() : this.nominalVolts;

    // Float switches (a stuck float reports and acts on its stuck state).
    const stuckClosed = this.faultActive('float_stuck_closed', mid);
    const stuckOpen = this.faultActive('float_stuck_open', mid);
    for (const f of this.floats) {
      f.sense();
      const first = this.floats[0]?.key;
      if (stuckClosed && (stuckClosed.target ?? first) === f.key) f.closed = true;
      if (stuckOpen && (stuckOpen.target ?? first) === f.key) f.closed = false;
      if (this.lastFloatStates.get(f.key) !== f.closed) {
        this.lastFloatStates.set(f.key, f.closed);
        this.events.push({ name: `float/${f.key}/closed`, t: eventT, value: f.closed });
      }
    }

    // Water use: through the booster and pressure tank, or straight from the storage tank.
    let loadAmpSeconds = 0;
    if (this.booster) {
      const supply = this.booster.supply;
      const result = this.booster.system.step(
        t0,
        dt,
        (t) => this.use.demandAt(t),
        supply ? supply.volumeCubicMetres : Number.POSITIVE_INFINITY,
        busVolts,
        allowed,
        this.airShare(mid),
      );
      if (supply) supply.draw(result.pumpedCubicMetres);
      this.ledger.deliveredCubicMetres += result.deliveredCubicMetres;
      loadAmpSeconds += result.ampSeconds;
      for (const s of result.switches) {
        this.events.push({ name: `pump/${this.booster.key}/running`, t: s.t, value: s.running });
      }
    } else {
      const tank = this.firstStorageTank();
      let wanted = 0;
      for (let s = 0; s < dt; s += DEMAND_SLICE_SECONDS) {
        const h = Math.min(DEMAND_SLICE_SECONDS, dt - s);
        wanted += this.use.demandAt(t0 + s + h / 2) * h;
      }
      const delivered = tank ? tank.draw(wanted) : wanted;
      this.ledger.deliveredCubicMetres += delivered;
      this.ledger.unmetDemandCubicMetres += wanted - delivered;
    }

    // Well pumps fill their tanks.
    const drawnDown = this.faultActive('well_drawn_down', mid);
    for (const unit of this.wellPumps) {
      const called = unit.float ? unit.float.closed : true;
      const condition = drawnDown ? unit.well.drawnDown() : unit.well.normal;
      const r = unit.pump.step(
        called,
        { availableWatts: unit.array?.availableWatts ?? 0, busVolts, allowed },
        condition,
        dt,
      );
      if (r.running !== unit.running) {
        this.events.push({
          name: `pump/${unit.pump.spec.key}/running`,
          t: eventT,
          value: r.running,
        });
      }
      unit.running = r.running;
      unit.amps = r.amps;
      unit.flow = r.flowCubicMetresPerSecond;
      const water = r.flowCubicMetresPerSecond * dt;
      this.ledger.pumpedFromWellsCubicMetres += water;
      if (unit.tank) unit.tank.fill(water);
      if (unit.array) unit.array.drawnWatts = r.watts;
      else loadAmpSeconds += r.amps * dt;
    }

    if (!this.bank || !this.controller) return;
    const bank = this.bank;
    // Other loads on the bus: a base load, lights in the evening, a parasitic load if faulted.
    const hour = ((((mid + (this.site.longitude / 15) * 3600) % 86_400) + 86_400) % 86_400) / 3600;
    const evening = hour >= 18 && hour < 23 ? EVENING_LOAD_WATTS : 0;
    let otherAmps = allowed ? (BASE_LOAD_WATTS + evening) / busVolts : 0;
    const parasite = this.faultActive('parasitic_load', mid);
    if (parasite && allowed) {
      otherAmps += parasite.target ? Number(parasite.target) : 0.05 * bank.config.capacityAmpHours;
    }
    const loadAmps = loadAmpSeconds / dt + otherAmps;

    bank.condition = this.faultActive('battery_aged', mid)
      ? {
          health: AGED.health,
          resistanceFactor: AGED.resistanceFactor,
          leakAmps: AGED.leakPerHour * bank.config.capacityAmpHours,
        }
      : { health: 1, resistanceFactor: 1, leakAmps: 0 };
    const available = this.chargingArrays.reduce((sum, a) => sum + a.availableWatts, 0);
    const failed = Boolean(this.faultActive('charge_controller_failed', mid));
    const c = this.controller.step(available, loadAmps, dt, failed);
    for (const a of this.chargingArrays) {
      a.drawnWatts = available > 0 ? (c.arrayWatts * a.availableWatts) / available : 0;
    }
    let amps = c.outputAmps - loadAmps;
    // The bank cannot give more than it holds; what is missing is simply not delivered (the
    // disconnect below trips on the same step in practice).
    if (amps < 0) amps = -Math.min(-amps, bank.availableAmps(dt));
    bank.flow(amps, dt);
    if (amps > 0) this.ledger.chargedAmpHours += (amps * dt) / 3600;
    else this.ledger.dischargedAmpHours += (-amps * dt) / 3600;
    this.batteryAmps = amps;
    bank.settleTemperature(air, amps, dt);

    this.busVolts = c.regulatedVolts ?? bank.terminalVolts(amps);
    const volts = this.busVolts;
    if (
      !this.disconnected &&
      (volts < DISCONNECT_VOLTS_PER_CELL[this.family] * bank.cells || bank.socFraction < 0.02)
    ) {
      this.disconnected = true;
    } else if (
      this.disconnected &&
      bank.terminalVolts(0) > RECONNECT_VOLTS_PER_CELL[this.family] * bank.cells
    ) {
      this.disconnected = false;
    }
    if (this.disconnected) this.ledger.disconnectedSeconds += dt;
  }

  /** Battery terminal voltage now, volts. */
  bankVolts(): number {
    if (!this.bank) return 0;
    return this.busVolts > 0 ? this.busVolts : this.bank.terminalVolts(this.batteryAmps);
  }

  private firstStorageTank(): StorageTank | null {
    for (const tank of this.tanks.values()) return tank;
    return null;
  }

  /** Switch changes since the last call, with the times they happened. */
  takeSwitchEvents(): OutgoingReading[] {
    const out = this.events;
    this.events = [];
    return out;
  }

  /** What the gateway reads now: every channel of the site, with a little sensor noise. */
  readings(): OutgoingReading[] {
    const t = this.t;
    const n = this.noise;
    const out: OutgoingReading[] = [];
    const round = (v: number, places: number) => {
      const f = 10 ** places;
      return Math.round(v * f) / f + 0;
    };
    if (this.bank && this.controller) {
      const amps = this.batteryAmps;
      out.push({ name: 'battery/voltage', t, value: round(this.bankVolts() + n.noise(0.004), 3) });
      out.push({ name: 'battery/current', t, value: round(amps + n.noise(0.03), 2) });
      out.push({
        name: 'battery/temperature',
        t,
        value: round(this.bank.temperatureCelsius + n.noise(0.1), 1),
      });
      out.push({ name: 'controller/stage', t, value: this.controller.stage });
    }
    for (const a of this.allArrays) {
      out.push({
        name: `pv/${a.config.key}/voltage`,
        t,
        value: round(a.volts() > 0 ? a.volts() + n.noise(0.05) : 0, 2),
      });
      out.push({
        name: `pv/${a.config.key}/current`,
        t,
        value: round(Math.max(0, a.amps() + (a.drawnWatts > 0 ? n.noise(0.02) : 0)), 2),
      });
    }
    for (const unit of this.wellPumps) {
      const key = unit.pump.spec.key;
      out.push({ name: `pump/${key}/running`, t, value: unit.running });
      out.push({
        name: `pump/${key}/current`,
        t,
        value: round(Math.max(0, unit.amps + (unit.running ? n.noise(0.03) : 0)), 2),
      });
    }
    if (this.booster) {
      const b = this.booster.system;
      out.push({ name: `pump/${this.booster.key}/running`, t, value: b.running });
      out.push({
        name: `pump/${this.booster.key}/current`,
        t,
        value: round(Math.max(0, b.amps + (b.running ? n.noise(0.03) : 0)), 2),
      });
      out.push({
        name: `pressure/${b.tank.key}`,
        t,
        value: Math.round(Math.max(0, b.gaugePascals(this.airShare(t)) + n.noise(250))),
      });
    }
    for (const [key, tank] of this.tanks) {
      out.push({
        name: `tank/${key}/level`,
        t,
        value: round(tank.levelReadingMetres() + n.noise(0.002), 3),
      });
    }
    for (const f of this.floats) out.push({ name: `float/${f.key}/closed`, t, value: f.closed });
    const well = this.wellPumps[0]?.well;
    if (well)
      out.push({ name: 'well/level', t, value: round(well.depthToWaterMetres + n.noise(0.01), 2) });
    return out;
  }

  /** Sun, sky and air now, for the CLI's status line and for tests. */
  conditions(): { clearness: number; airCelsius: number; clearSkyGhi: number } {
    return {
      clearness: this.weather.clearness(this.t),
      airCelsius: this.weather.airCelsius(this.t),
      clearSkyGhi: this.sun.at(this.t).clearSkyGhi,
    };
  }

  /** State of the well pumps, for tests. */
  wellPumpStates(): {
    key: string;
    running: boolean;
    amps: number;
    flow: number;
    depthToWater: number;
  }[] {
    return this.wellPumps.map((u) => ({
      key: u.pump.spec.key,
      running: u.running,
      amps: u.amps,
      flow: u.flow,
      depthToWater: u.well.depthToWaterMetres,
    }));
  }
}

/** Core's tank description from a site's tank spec. */
export function tankConfig(spec: TankSpec): TankConfig {
  let geometry: TankGeometry;
  switch (spec.geometry) {
    case 'horizontal_cylinder':
      geometry = {
        shape: 'horizontal_cylinder',
        diameterMetres: spec.diameterM ?? 1,
        lengthMetres: spec.lengthM ?? 1,
      };
      break;
    case 'rectangular':
      geometry = {
        shape: 'rectangular',
        lengthMetres: spec.lengthM ?? 1,
        widthMetres: spec.widthM ?? 1,
        heightMetres: spec.heightM ?? 1,
      };
      break;
    default:
      geometry = {
        shape: 'vertical_cylinder',
        diameterMetres: spec.diameterM ?? 1,
        heightMetres: spec.heightM ?? 1,
      };
  }
  return { key: spec.key, geometry, sensorOffsetMetres: spec.sensorOffsetM ?? 0 };
}
