import { serialiseTelemetryPackJson, type OutgoingReading } from '@wellkept/core';
import type { MqttClient } from 'mqtt';
import { publishAcked } from '../../support/ingest-harness.js';

/** Publishes readings as one SenML pack at QoS 1 and resolves on the PUBACK (= committed). */
export function publishReadings(
  client: MqttClient,
  gatewayId: string,
  readings: readonly OutgoingReading[],
): Promise<void> {
  if (readings.length === 0) return Promise.resolve();
  return publishAcked(
    client,
    `gateways/${gatewayId}/senml`,
    serialiseTelemetryPackJson(gatewayId, readings),
  );
}
