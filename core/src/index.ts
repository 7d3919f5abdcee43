/**
 * @wellkept/core: the trade arithmetic and the telemetry contract, pure TypeScript with no I/O.
 * Everything inside is SI; see units.ts for display conversions.
 */
export * from './units.js';
export * from './series.js';
export * from './time-zone.js';
export * from './tanks/tank-volume.js';
export * from './tanks/water-use.js';
export * from './telemetry/measurements.js';
export * from './telemetry/senml-validate.js';
export * from './telemetry/senml-serialise.js';
export * from './battery/chemistry-curves.js';
export * from './battery/state-of-charge.js';
export * from './battery/rest-detection.js';
export * from './battery/amp-hour-counter.js';
export * from './battery/charge-setpoints.js';
export * from './battery/overnight.js';
export * from './sun/solar-position.js';
export * from './sun/daylight.js';
export * from './sun/clear-sky.js';
export * from './sun/pv-output.js';
export * from './pumps/hydraulics.js';
export * from './pumps/pressure-tank.js';
export * from './pumps/pump-runs.js';
export * from './pumps/water-delivered.js';
export * from './pumps/run-hours.js';
export * from './wiring/voltage-drop.js';
export * from './rules/types.js';
export * from './rules/defaults.js';
export * from './rules/index.js';
export { latestSampleTime } from './rules/gateway-silent.js';
export * from './health.js';
