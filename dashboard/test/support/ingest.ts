/**
 * The real ingest service for the live-update browser test, borrowed from ingest's own test
 * harness (free ports, embedded broker). It is loaded by a computed path so that `tsc -p
 * dashboard` does not type-check ingest's sources under the dashboard's compiler settings
 * (ingest has its own); Vitest still transforms them (see vitest.config.ts).
 */
import { fileURLToPath } from 'node:url';
import type { MqttClient } from 'mqtt';

export interface RunningIngest {
  mqttUrl: string;
  /** One roll-up sweep now: buckets, then pump runs from the switch states and currents. */
  sweep(): Promise<unknown>;
  close(): Promise<void>;
}

interface IngestHarness {
  startTestIngest(
    databaseUrl: string,
    overrides?: { lastSeenIntervalMs?: number },
  ): Promise<RunningIngest>;
  connectGateway(url: string, gateway: { gatewayId: string; secret: string }): Promise<MqttClient>;
  publishAcked(client: MqttClient, topic: string, payload: string): Promise<void>;
  baseName(gatewayId: string): string;
}

const harnessPath = fileURLToPath(
  new URL('../../../ingest/test/support/ingest-harness.ts', import.meta.url),
);

export async function loadIngestHarness(): Promise<IngestHarness> {
  return (await import(/* @vite-ignore */ harnessPath)) as IngestHarness;
}
