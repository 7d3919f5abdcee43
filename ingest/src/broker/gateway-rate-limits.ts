/**
 * Per-gateway rate limits for the broker: how often one gateway id may connect and how fast it
 * may publish. Each is a token bucket (a burst, then a steady rate), kept per gateway so a
 * gateway stuck in a reconnect loop or sending as fast as it can is held back on its own while
 * every other gateway carries on.
 */

/** The limits, from the environment (see `readIngestConfig`) or these defaults. */
export interface GatewayRateLimitSettings {
  /** Connections one gateway id may make in a burst. */
  connectBurst: number;
  /** Steady connection rate per gateway id, per minute. */
  connectsPerMinute: number;
  /** Publishes (packs and status) one gateway may send in a burst. */
  publishBurst: number;
  /** Steady publish rate per gateway, per second. */
  publishesPerSecond: number;
  /**
   * Longest a throttled publish is held before it is taken; a gateway whose backlog needs more
   * is disconnected (it keeps its unacknowledged packs and sends them again later).
   */
  maxPublishDelayMs: number;
}

/**
 * Defaults for gateways that report every 10–60 s: a store-and-forward catch-up after an
 * outage (a few dozen packs of up to 5,000 records) fits in the burst, and thirty reconnects in
 * a row are fine (a gateway retrying every second through a one-minute database outage); one
 * looping faster than a connection every 2 s is then refused until its bucket refills.
 */
export const DEFAULT_GATEWAY_RATE_LIMITS: Readonly<GatewayRateLimitSettings> = {
  connectBurst: 30,
  connectsPerMinute: 30,
  publishBurst: 200,
  publishesPerSecond: 20,
  maxPublishDelayMs: 30_000,
};

/** Buckets untouched this long are full again and dropped from memory. */
const IDLE_MS = 10 * 60_000;
const MAX_TRACKED = 100_000;

/** A token bucket that may go into debt: a taken token past the burst is a wait. */
class Bucket {
  tokens: number;
  updated: number;

  constructor(
    private readonly burst: number,
    private readonly perMs: number,
    now: number,
  ) {
    this.tokens = burst;
    this.updated = now;
  }

  refill(now: number): void {
    this.tokens = Math.min(this.burst, this.tokens + (now - this.updated) * this.perMs);
    this.updated = now;
  }

  /** Milliseconds until one more token would be available (0 when one is there now). */
  waitMs(now: number): number {
    this.refill(now);
    return this.tokens >= 1 ? 0 : Math.ceil((1 - this.tokens) / this.perMs);
  }
}

export class GatewayRateLimiter {
  readonly settings: GatewayRateLimitSettings;
  private readonly connects = new Map<string, Bucket>();
  private readonly publishes = new Map<string, Bucket>();

  constructor(
    settings: Partial<GatewayRateLimitSettings> = {},
    private readonly clock: () => number = Date.now,
  ) {
    this.settings = { ...DEFAULT_GATEWAY_RATE_LIMITS, ...settings };
  }

  /** Milliseconds before `gatewayId` may connect again; 0 when it may connect now. */
  connectWaitMs(gatewayId: string): number {
    return this.connects.get(gatewayId)?.waitMs(this.clock()) ?? 0;
  }

  /** Counts one accepted connection of `gatewayId`. */
  takeConnect(gatewayId: string): void {
    const { connectBurst, connectsPerMinute } = this.settings;
    this.bucket(this.connects, gatewayId, connectBurst, connectsPerMinute / 60_000).tokens -= 1;
  }

  /**
   * Reserves a publish for `gatewayId`: returns how long to hold it (0: at once), or null when
   * the hold would be longer than `maxPublishDelayMs` (nothing is reserved then).
   */
  reservePublish(gatewayId: string): number | null {
    const { publishBurst, publishesPerSecond, maxPublishDelayMs } = this.settings;
    const bucket = this.bucket(this.publishes, gatewayId, publishBurst, publishesPerSecond / 1000);
    const wait = bucket.waitMs(this.clock());
    if (wait > maxPublishDelayMs) return null;
    // Going into debt queues this publish behind the ones already waiting, in order.
    bucket.tokens -= 1;
    return wait;
  }

  private bucket(map: Map<string, Bucket>, key: string, burst: number, perMs: number): Bucket {
    const now = this.clock();
    let bucket = map.get(key);
    if (!bucket) {
      if (map.size >= MAX_TRACKED) {
        for (const [k, b] of map) if (now - b.updated > IDLE_MS) map.delete(k);
      }
      bucket = new Bucket(burst, perMs, now);
      map.set(key, bucket);
    } else bucket.refill(now);
    return bucket;
  }
}
