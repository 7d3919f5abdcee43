/** One line of fleet counters for the console. */
import type { GatewayLinkStats } from '../gateway/gateway-link.js';

export function formatStats(
  stats: readonly { gatewayId: string; link: GatewayLinkStats }[],
): string {
  let acked = 0;
  let queued = 0;
  let dropped = 0;
  let rejected = 0;
  let online = 0;
  for (const s of stats) {
    acked += s.link.ackedReadings;
    queued += s.link.queued + s.link.inFlightReadings;
    dropped += s.link.droppedReadings;
    rejected += s.link.rejectedRecords + s.link.rejectedPacks;
  }
  online = stats.filter((s) => s.link.connects > 0).length;
  return `${stats.length} gateways (${online} connected at least once): ${acked} readings acknowledged, ${queued} waiting, ${dropped} dropped, ${rejected} refused by ingest`;
}
