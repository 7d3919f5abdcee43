/**
 * @wellkept/simulator as a library: for benchmarks and tests of other workspaces that need
 * simulated gateways (the CLI is src/cli.ts).
 */
export { siteSpecSchema, type SiteSpec } from './site-spec.js';
export { SiteSimulation, type SimulationOptions } from './physics/site-simulation.js';
export {
  GatewayLink,
  type GatewayCredentials,
  type GatewayLinkStats,
} from './gateway/gateway-link.js';
export { Fleet, type FleetOptions } from './modes/fleet.js';
export {
  provisionLoadGateways,
  runLoad,
  loadGatewayId,
  type LoadOptions,
  type LoadResult,
} from './modes/load.js';
export { FAULTS, FAULT_KINDS, type FaultKind, type ScheduledFault } from './faults/fault-kinds.js';
export { parseFaultFlag } from './faults/fault-schedule.js';
export { replayAlerts, type AlertChange } from './check/alert-replay.js';
export { demoSites, demoCompany, demoUsers } from './demo/scenario.js';
export { seedDemo, readDemoGateways, demoSignInLines } from './demo/seed.js';
