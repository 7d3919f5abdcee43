/**
 * Where the simulator's sites, faults and gateway secrets come from: the demo scenario and the
 * seed's gateway file by default, or files given on the command line. A config file is JSON:
 *
 *   {
 *     "sites": [ …site descriptions, as in src/demo/scenario.ts… ],   (optional: default demo)
 *     "faults": [ { "site": "red-mesa-ranch", "kind": "float_stuck_closed",
 *                   "start": "-1d", "duration": "10d", "target": "north-float" } ]
 *   }
 *
 * A credentials file is a JSON array of { "gatewayId": "...", "secret": "..." } (the seed's
 * `.data/demo-gateways.json` has this shape).
 */
import { existsSync, readFileSync } from 'node:fs';
import { z } from 'zod';
import { demoSites } from '../demo/scenario.js';
import { faultFromEntry } from '../faults/fault-schedule.js';
import type { ScheduledFault } from '../faults/fault-kinds.js';
import type { GatewayCredentials } from '../gateway/gateway-link.js';
import { type SiteSpec, siteSpecSchema } from '../site-spec.js';

const configSchema = z.object({
  sites: z.array(siteSpecSchema).optional(),
  faults: z
    .array(
      z.object({
        site: z.string(),
        kind: z.string(),
        start: z.string().optional(),
        duration: z.string().optional(),
        target: z.string().optional(),
      }),
    )
    .optional(),
});

const credentialsSchema = z.array(
  z.object({ gatewayId: z.string().min(1), secret: z.string().min(1) }).passthrough(),
);

export interface SimulatorConfig {
  sites: SiteSpec[];
  faults: ScheduledFault[];
}

function readJson(file: string, what: string): unknown {
  if (!existsSync(file)) throw new Error(`${what} ${file} does not exist`);
  try {
    return JSON.parse(readFileSync(file, 'utf8'));
  } catch (error) {
    throw new Error(`${what} ${file} is not valid JSON: ${(error as Error).message}`);
  }
}

function describeIssues(error: z.ZodError): string {
  return error.issues.map((i) => `  ${i.path.join('.') || '(top)'}: ${i.message}`).join('\n');
}

/** Reads a config file (or the demo scenario without one), with faults relative to `nowT`. */
export function loadSimulatorConfig(file: string | undefined, nowT: number): SimulatorConfig {
  if (!file) return { sites: demoSites.map((s) => ({ ...s })), faults: [] };
  const parsed = configSchema.safeParse(readJson(file, 'config file'));
  if (!parsed.success) {
    throw new Error(`config file ${file} is not valid:\n${describeIssues(parsed.error)}`);
  }
  const sites = parsed.data.sites ?? demoSites.map((s) => ({ ...s }));
  const keys = sites.map((s) => s.key);
  const faults = (parsed.data.faults ?? []).map((f, i) =>
    faultFromEntry(f, nowT, keys, `config file ${file}, faults[${i}]`),
  );
  return { sites, faults };
}

/** Reads gateway secrets from a credentials file. */
export function loadCredentials(file: string): GatewayCredentials[] {
  const parsed = credentialsSchema.safeParse(readJson(file, 'credentials file'));
  if (!parsed.success) {
    throw new Error(
      `credentials file ${file} must be a JSON array of { gatewayId, secret }:\n${describeIssues(parsed.error)}`,
    );
  }
  return parsed.data.map((c) => ({ gatewayId: c.gatewayId, secret: c.secret }));
}

/** Sites that have credentials, and a clear error naming those that do not. */
export function sitesWithCredentials(
  sites: readonly SiteSpec[],
  credentials: readonly GatewayCredentials[],
  wanted: readonly string[],
): { site: SiteSpec; credentials: GatewayCredentials }[] {
  const bySite = new Map(credentials.map((c) => [c.gatewayId, c]));
  const chosen = wanted.length > 0 ? wanted : sites.map((s) => s.key);
  const out: { site: SiteSpec; credentials: GatewayCredentials }[] = [];
  for (const key of chosen) {
    const site = sites.find((s) => s.key === key);
    if (!site) throw new Error(`no site "${key}" (sites: ${sites.map((s) => s.key).join(', ')})`);
    const c = bySite.get(site.gatewayId);
    if (!c) {
      throw new Error(
        `no secret for gateway ${site.gatewayId} (site ${site.key}) in the credentials file`,
      );
    }
    out.push({ site, credentials: c });
  }
  return out;
}
