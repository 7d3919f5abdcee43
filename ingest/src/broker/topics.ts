/** The topics of the telemetry contract (docs/telemetry.md). */
export const TOPIC_PREFIX = 'gateways/';

export type GatewayTopicKind = 'senml' | 'status' | 'rejects';

export function senmlTopic(gatewayId: string): string {
  return `${TOPIC_PREFIX}${gatewayId}/senml`;
}
export function statusTopic(gatewayId: string): string {
  return `${TOPIC_PREFIX}${gatewayId}/status`;
}
export function rejectsTopic(gatewayId: string): string {
  return `${TOPIC_PREFIX}${gatewayId}/rejects`;
}

/** What a gateway may publish: its own `senml` and `status` topics, nothing else. */
export function publishableKind(gatewayId: string, topic: string): 'senml' | 'status' | null {
  if (topic === senmlTopic(gatewayId)) return 'senml';
  if (topic === statusTopic(gatewayId)) return 'status';
  return null;
}

/**
 * A gateway may subscribe only inside its own `gateways/<id>/` tree; wildcards are fine there
 * because they cannot reach outside it.
 */
export function maySubscribe(gatewayId: string, topicFilter: string): boolean {
  return topicFilter.startsWith(`${TOPIC_PREFIX}${gatewayId}/`);
}
