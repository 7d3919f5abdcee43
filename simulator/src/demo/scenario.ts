/**
 * The demo scenario: a fictional installer company with fictional sites and people. Every
 * name, address and coordinate here is invented; e-mail addresses use the reserved
 * `.example` domain (RFC 2606).
 */

import type { PumpSpec, SiteSpec, TankSpec } from '../site-spec.js';

export interface DemoUser {
  email: string;
  name: string;
  role: 'admin' | 'technician' | 'owner';
  password: string;
  unitSystem: 'us' | 'metric';
  timeZone: string;
  /** Site keys an owner is linked to. */
  sites?: string[];
}

/** A demo site: the simulator's site description (see ../site-spec.ts). */
export type DemoSite = SiteSpec;
export type DemoPump = PumpSpec;
export type DemoTank = TankSpec;

const PSI = 6894.757293168;
const GALLON = 0.003785411784;
const INCH = 0.0254;
const FOOT = 0.3048;

export const demoCompany = { name: 'Lanternfield Water & Solar' };

export const demoUsers: DemoUser[] = [
  {
    email: 'admin@lanternfield.example',
    name: 'Rosa Quillan',
    role: 'admin',
    password: 'demo-admin-pass',
    unitSystem: 'us',
    timeZone: 'America/Denver',
  },
  {
    email: 'tech@lanternfield.example',
    name: 'Teo Marsh',
    role: 'technician',
    password: 'demo-tech-pass',
    unitSystem: 'us',
    timeZone: 'America/Denver',
  },
  {
    email: 'owner@lanternfield.example',
    name: 'Ida Brannock',
    role: 'owner',
    password: 'demo-owner-pass',
    unitSystem: 'us',
    timeZone: 'America/Denver',
    sites: ['juniper-bench', 'owl-creek-cabin'],
  },
  {
    email: 'owner.metric@lanternfield.example',
    name: 'Nils Arvelo',
    role: 'owner',
    password: 'demo-owner-pass',
    unitSystem: 'metric',
    timeZone: 'Australia/Adelaide',
    sites: ['saltbush-tank'],
  },
];

export const demoSites: DemoSite[] = [
  {
    key: 'juniper-bench',
    name: 'Juniper Bench Homestead',
    locality: 'high desert mesa, 40 km from town',
    latitude: 35.412,
    longitude: -107.861,
    elevationM: 2050,
    timeZone: 'America/Denver',
    notes: 'PV-direct well pump fills the cistern; battery-run booster pump for the house.',
    battery: { chemistry: 'agm', nominalVoltageV: 24, capacityAh: 400, strings: 1 },
    pvArrays: [
      { key: 'house', name: 'House array', ratedW: 1600, purpose: 'battery_charging' },
      { key: 'well', name: 'Well pump array', ratedW: 900, purpose: 'pump_direct', pump: 'well' },
    ],
    pumps: [
      {
        key: 'well',
        name: 'Well pump',
        kind: 'well',
        supply: 'pv_direct',
        ratedCurrentA: 7.5,
        ratedFlowM3s: (4 * GALLON) / 60,
        motorPowerW: 560,
        rebuildIntervalH: 8000,
        fillsTank: 'cistern',
      },
      {
        key: 'booster',
        name: 'Booster pump',
        kind: 'booster',
        supply: 'battery',
        ratedCurrentA: 9,
        ratedFlowM3s: (3 * GALLON) / 60,
        motorPowerW: 220,
        drawsFromTank: 'cistern',
      },
    ],
    tanks: [
      {
        key: 'cistern',
        name: 'Cistern',
        kind: 'storage',
        geometry: 'vertical_cylinder',
        diameterM: 3.05,
        heightM: 2.44,
        sensorOffsetM: 0.05,
      },
      {
        key: 'bladder',
        name: 'Pressure tank',
        kind: 'pressure',
        capacityM3: 44 * GALLON,
        prechargePa: 28 * PSI,
        cutInPa: 30 * PSI,
        cutOutPa: 50 * PSI,
      },
    ],
    floats: [
      {
        key: 'cistern-full',
        name: 'Cistern float',
        tank: 'cistern',
        pump: 'well',
        logic: 'opens_on_high',
      },
    ],
    well: { depthM: 96, casingDiameterM: 6 * INCH, staticLevelM: 41, pumpSettingM: 70 },
    gatewayId: 'gw-juniper-bench',
    waterUse: { dailyCubicMetres: 0.9, profile: 'household' },
    cloudiness: 0.2,
  },
  {
    key: 'owl-creek-cabin',
    name: 'Owl Creek Cabin',
    locality: 'forest road 12, north slope',
    latitude: 46.921,
    longitude: -113.402,
    elevationM: 1480,
    timeZone: 'America/Denver',
    notes: 'LiFePO4 cabin system; well pump runs from the battery bank.',
    battery: { chemistry: 'lifepo4', nominalVoltageV: 24, capacityAh: 200, strings: 1 },
    pvArrays: [{ key: 'roof', name: 'Roof array', ratedW: 1200, purpose: 'battery_charging' }],
    pumps: [
      {
        key: 'well',
        name: 'Well pump',
        kind: 'well',
        supply: 'battery',
        ratedCurrentA: 6,
        ratedFlowM3s: (2.5 * GALLON) / 60,
        motorPowerW: 370,
        rebuildIntervalH: 6000,
        fillsTank: 'storage',
      },
    ],
    tanks: [
      {
        key: 'storage',
        name: 'Storage tank',
        kind: 'storage',
        geometry: 'vertical_cylinder',
        diameterM: 1.6,
        heightM: 1.9,
      },
    ],
    floats: [
      {
        key: 'storage-low',
        name: 'Storage float',
        tank: 'storage',
        pump: 'well',
        logic: 'closes_on_low',
      },
    ],
    well: { depthM: 55, casingDiameterM: 4 * INCH, staticLevelM: 18, pumpSettingM: 40 },
    gatewayId: 'gw-owl-creek',
    waterUse: { dailyCubicMetres: 0.35, profile: 'cabin' },
    cloudiness: 0.5,
    faults: [{ kind: 'parasitic_load', startDaysAgo: 3, durationHours: 24 * 10 }],
  },
  {
    key: 'red-mesa-ranch',
    name: 'Red Mesa Ranch',
    locality: 'county road 9, stock water',
    latitude: 33.874,
    longitude: -104.722,
    elevationM: 1350,
    timeZone: 'America/Denver',
    notes: 'Battery-based system with two fill pumps on one tank, each with its own float switch.',
    battery: { chemistry: 'flooded', nominalVoltageV: 48, capacityAh: 450, strings: 1 },
    pvArrays: [{ key: 'main', name: 'Main array', ratedW: 3200, purpose: 'battery_charging' }],
    pumps: [
      {
        key: 'north-well',
        name: 'North well pump',
        kind: 'well',
        supply: 'battery',
        ratedCurrentA: 8,
        ratedFlowM3s: (5 * GALLON) / 60,
        motorPowerW: 750,
        rebuildIntervalH: 8000,
        fillsTank: 'stock',
      },
      {
        key: 'south-well',
        name: 'South well pump',
        kind: 'well',
        supply: 'battery',
        ratedCurrentA: 7,
        ratedFlowM3s: (4 * GALLON) / 60,
        motorPowerW: 560,
        rebuildIntervalH: 8000,
        fillsTank: 'stock',
      },
    ],
    tanks: [
      {
        key: 'stock',
        name: 'Stock tank',
        kind: 'storage',
        geometry: 'vertical_cylinder',
        diameterM: 4.2,
        heightM: 2.4,
      },
    ],
    floats: [
      {
        key: 'north-float',
        name: 'North float',
        tank: 'stock',
        pump: 'north-well',
        logic: 'opens_on_high',
      },
      {
        key: 'south-float',
        name: 'South float',
        tank: 'stock',
        pump: 'south-well',
        logic: 'opens_on_high',
      },
    ],
    well: { depthM: 120, casingDiameterM: 6 * INCH, staticLevelM: 52, pumpSettingM: 90 },
    gatewayId: 'gw-red-mesa',
    waterUse: { dailyCubicMetres: 3.2, profile: 'livestock' },
    cloudiness: 0.2,
    faults: [
      {
        kind: 'float_stuck_closed',
        startDaysAgo: 1,
        durationHours: 24 * 10,
        target: 'north-float',
      },
    ],
  },
  {
    key: 'saltbush-tank',
    name: 'Saltbush Tank Station',
    locality: 'gibber plain, 90 km track',
    latitude: -29.318,
    longitude: 136.944,
    elevationM: 120,
    timeZone: 'Australia/Adelaide',
    notes: 'Horizontal tank on a stand; metric owner.',
    battery: { chemistry: 'gel', nominalVoltageV: 24, capacityAh: 300, strings: 1 },
    pvArrays: [{ key: 'main', name: 'Main array', ratedW: 1500, purpose: 'battery_charging' }],
    pumps: [
      {
        key: 'bore',
        name: 'Bore pump',
        kind: 'well',
        supply: 'battery',
        ratedCurrentA: 7,
        ratedFlowM3s: 0.25 / 1000,
        motorPowerW: 450,
        rebuildIntervalH: 7000,
        fillsTank: 'header',
      },
    ],
    tanks: [
      {
        key: 'header',
        name: 'Header tank',
        kind: 'storage',
        geometry: 'horizontal_cylinder',
        diameterM: 1.45,
        lengthM: 4.5,
      },
    ],
    floats: [
      {
        key: 'header-full',
        name: 'Header float',
        tank: 'header',
        pump: 'bore',
        logic: 'opens_on_high',
      },
    ],
    well: { depthM: 80, casingDiameterM: 0.1016, staticLevelM: 30, pumpSettingM: 60 },
    gatewayId: 'gw-saltbush',
    faults: [{ kind: 'bad_payloads', startDaysAgo: 2, durationHours: 24 * 10 }],
    waterUse: { dailyCubicMetres: 1.2, profile: 'livestock' },
    cloudiness: 0.1,
  },
  {
    key: 'quail-hollow',
    name: 'Quail Hollow Place',
    locality: 'valley floor, end of the lane',
    latitude: 30.418,
    longitude: -99.962,
    elevationM: 610,
    timeZone: 'America/Chicago',
    notes: 'Well drawn down in late summer; watch for dry runs.',
    battery: { chemistry: 'agm', nominalVoltageV: 12, capacityAh: 220, strings: 1 },
    pvArrays: [{ key: 'main', name: 'Main array', ratedW: 600, purpose: 'battery_charging' }],
    pumps: [
      {
        key: 'well',
        name: 'Well pump',
        kind: 'well',
        supply: 'battery',
        ratedCurrentA: 5,
        ratedFlowM3s: (1.5 * GALLON) / 60,
        motorPowerW: 180,
        rebuildIntervalH: 5000,
        fillsTank: 'cistern',
      },
    ],
    tanks: [
      {
        key: 'cistern',
        name: 'Cistern',
        kind: 'storage',
        geometry: 'rectangular',
        lengthM: 2.4,
        widthM: 1.8,
        heightM: 1.5,
      },
    ],
    floats: [
      {
        key: 'cistern-full',
        name: 'Cistern float',
        tank: 'cistern',
        pump: 'well',
        logic: 'opens_on_high',
      },
    ],
    well: { depthM: 45, casingDiameterM: 4 * INCH, staticLevelM: 28, pumpSettingM: 38 },
    gatewayId: 'gw-quail-hollow',
    waterUse: { dailyCubicMetres: 0.55, profile: 'household' },
    cloudiness: 0.35,
    faults: [{ kind: 'well_drawn_down', startDaysAgo: 2, durationHours: 24 * 10 }],
  },
  {
    key: 'pinon-ridge',
    name: 'Piñon Ridge Retreat',
    locality: 'ridge road, mile 7',
    latitude: 36.702,
    longitude: -105.311,
    elevationM: 2400,
    timeZone: 'America/Denver',
    notes: 'Booster pump and bladder tank for three cabins.',
    battery: { chemistry: 'lifepo4', nominalVoltageV: 48, capacityAh: 280, strings: 1 },
    pvArrays: [{ key: 'main', name: 'Main array', ratedW: 4000, purpose: 'battery_charging' }],
    pumps: [
      {
        key: 'well',
        name: 'Well pump',
        kind: 'well',
        supply: 'battery',
        ratedCurrentA: 6.5,
        ratedFlowM3s: (4 * GALLON) / 60,
        motorPowerW: 750,
        rebuildIntervalH: 8000,
        fillsTank: 'cistern',
      },
      {
        key: 'booster',
        name: 'Booster pump',
        kind: 'booster',
        supply: 'battery',
        ratedCurrentA: 6,
        ratedFlowM3s: (5 * GALLON) / 60,
        motorPowerW: 370,
        drawsFromTank: 'cistern',
      },
    ],
    tanks: [
      {
        key: 'cistern',
        name: 'Cistern',
        kind: 'storage',
        geometry: 'vertical_cylinder',
        diameterM: 2.4,
        heightM: 2.2,
      },
      {
        key: 'bladder',
        name: 'Pressure tank',
        kind: 'pressure',
        capacityM3: 86 * GALLON,
        prechargePa: 38 * PSI,
        cutInPa: 40 * PSI,
        cutOutPa: 60 * PSI,
      },
    ],
    floats: [
      {
        key: 'cistern-full',
        name: 'Cistern float',
        tank: 'cistern',
        pump: 'well',
        logic: 'opens_on_high',
      },
    ],
    well: { depthM: 150, casingDiameterM: 6 * INCH, staticLevelM: 88, pumpSettingM: 130 },
    gatewayId: 'gw-pinon-ridge',
    waterUse: { dailyCubicMetres: 1.1, profile: 'household' },
    cloudiness: 0.3,
    faults: [{ kind: 'bladder_lost_precharge', startDaysAgo: 1, durationHours: 24 * 10 }],
  },
  {
    key: 'dune-gate',
    name: 'Dune Gate Outstation',
    locality: 'dry river bed, 60 km track',
    latitude: -23.851,
    longitude: 16.512,
    elevationM: 1100,
    timeZone: 'Africa/Windhoek',
    notes: 'Remote outstation; the gateway goes quiet when the radio link drops.',
    battery: { chemistry: 'flooded', nominalVoltageV: 24, capacityAh: 600, strings: 2 },
    pvArrays: [{ key: 'main', name: 'Main array', ratedW: 1800, purpose: 'battery_charging' }],
    pumps: [
      {
        key: 'bore',
        name: 'Bore pump',
        kind: 'well',
        supply: 'battery',
        ratedCurrentA: 8,
        ratedFlowM3s: 0.3 / 1000,
        motorPowerW: 550,
        rebuildIntervalH: 7000,
        fillsTank: 'reservoir',
      },
    ],
    tanks: [
      {
        key: 'reservoir',
        name: 'Reservoir',
        kind: 'storage',
        geometry: 'rectangular',
        lengthM: 4,
        widthM: 3,
        heightM: 2,
      },
    ],
    floats: [
      {
        key: 'reservoir-full',
        name: 'Reservoir float',
        tank: 'reservoir',
        pump: 'bore',
        logic: 'opens_on_high',
      },
    ],
    well: { depthM: 110, casingDiameterM: 0.1524, staticLevelM: 46, pumpSettingM: 95 },
    gatewayId: 'gw-dune-gate',
    waterUse: { dailyCubicMetres: 1.6, profile: 'livestock' },
    cloudiness: 0.1,
    faults: [{ kind: 'gateway_offline', startDaysAgo: 0.25, durationHours: 24 * 10 }],
  },
  {
    key: 'cedar-spring',
    name: 'Cedar Spring Farm',
    locality: 'lower field, by the old windmill',
    latitude: 38.214,
    longitude: -111.583,
    elevationM: 1700,
    timeZone: 'America/Denver',
    notes: 'Charge controller replaced last spring.',
    battery: { chemistry: 'agm', nominalVoltageV: 24, capacityAh: 330, strings: 1 },
    pvArrays: [{ key: 'main', name: 'Main array', ratedW: 1400, purpose: 'battery_charging' }],
    pumps: [
      {
        key: 'well',
        name: 'Well pump',
        kind: 'well',
        supply: 'battery',
        ratedCurrentA: 7,
        ratedFlowM3s: (3 * GALLON) / 60,
        motorPowerW: 370,
        rebuildIntervalH: 8000,
        fillsTank: 'cistern',
      },
    ],
    tanks: [
      {
        key: 'cistern',
        name: 'Cistern',
        kind: 'storage',
        geometry: 'vertical_cylinder',
        diameterM: 2.6,
        heightM: 2.1,
      },
    ],
    floats: [
      {
        key: 'cistern-full',
        name: 'Cistern float',
        tank: 'cistern',
        pump: 'well',
        logic: 'opens_on_high',
      },
    ],
    well: { depthM: 70, casingDiameterM: 6 * INCH, staticLevelM: 20 * FOOT, pumpSettingM: 55 },
    gatewayId: 'gw-cedar-spring',
    waterUse: { dailyCubicMetres: 0.8, profile: 'household' },
    cloudiness: 0.3,
  },
];
