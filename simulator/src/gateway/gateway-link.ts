/**
 * One gateway's link to Wellkept, as docs/telemetry.md asks: MQTT 3.1.1 with MQTT.js, client id
 * = username = gateway id, the secret as password, a persistent session, a retained `online`
 * status with an `offline` will, and SenML packs (core's serialiser) at QoS 1 on
 * `gateways/<id>/senml`.
 *
 * Store-and-forward: readings wait in a bounded queue until the link is up; packs are handed to
 * MQTT.js a few at a time and a pack's readings leave the gateway only when its PUBACK arrives
 * (ingest sends it after the commit). A pack whose PUBACK never comes goes back to the front of
 * the queue; ingest stores a repeated reading once, so sending twice is harmless.
 */
import { EventEmitter } from 'node:events';
import { type OutgoingReading, serialiseTelemetryPackJson } from '@wellkept/core';
import mqtt, { type MqttClient } from 'mqtt';
import { ReadingQueue } from './reading-queue.js';

export interface GatewayCredentials {
  gatewayId: string;
  secret: string;
}

export interface GatewayLinkOptions {
  /** Broker URL, e.g. mqtt://127.0.0.1:1883. */
  url: string;
  credentials: GatewayCredentials;
  /** Most readings kept while the link is down. Default 200,000 (about a week of one site). */
  maxQueuedReadings?: number;
  /** Most records in one pack. Default 2,000 (well under ingest's 5,000 and 256 KiB). */
  maxRecordsPerPack?: number;
  /** Packs handed to MQTT.js and not yet acknowledged. Default 32. */
  maxPacksInFlight?: number;
  /** MQTT keep-alive, seconds. Default 30. */
  keepaliveSeconds?: number;
  /** Delay between reconnection attempts, milliseconds. Default 2,000. */
  reconnectMs?: number;
}

/** Counters for the CLI's status line and for tests. */
export interface GatewayLinkStats {
  queued: number;
  inFlightReadings: number;
  sentPacks: number;
  ackedPacks: number;
  ackedReadings: number;
  droppedReadings: number;
  /** Records ingest refused (from `gateways/<id>/rejects`). */
  rejectedRecords: number;
  /** Packs ingest could not use at all (`packError`). */
  rejectedPacks: number;
  connects: number;
}

interface Pack {
  readings: OutgoingReading[];
  settled: boolean;
  sentAt: number;
}

/** What ingest publishes on `gateways/<id>/rejects`. */
export interface RejectNotice {
  messageId?: number;
  records?: number;
  stored?: number;
  rejected?: { index: number; name?: string; reason: string }[];
  packError?: string;
}

export class GatewayLink extends EventEmitter<{
  connect: [];
  close: [];
  reject: [RejectNotice];
  drained: [];
  /** A pack was acknowledged: milliseconds from publish to PUBACK, and its readings. */
  acked: [latencyMs: number, readings: number];
  error: [Error];
}> {
  readonly gatewayId: string;
  private readonly queue: ReadingQueue;
  private readonly inFlight = new Set<Pack>();
  private readonly rawQueue: string[] = [];
  private client: MqttClient | null = null;
  private linkUp = true;
  private held = false;
  private closing = false;
  /** Time of the newest reading acknowledged so far, epoch seconds (0 before the first). */
  ackedThroughT = 0;
  private readonly options: Required<Omit<GatewayLinkOptions, 'credentials' | 'url'>>;
  private counters = {
    sentPacks: 0,
    ackedPacks: 0,
    ackedReadings: 0,
    rejectedRecords: 0,
    rejectedPacks: 0,
    connects: 0,
  };

  constructor(private readonly settings: GatewayLinkOptions) {
    super();
    this.gatewayId = settings.credentials.gatewayId;
    this.options = {
      maxQueuedReadings: settings.maxQueuedReadings ?? 200_000,
      maxRecordsPerPack: settings.maxRecordsPerPack ?? 2000,
      maxPacksInFlight: settings.maxPacksInFlight ?? 32,
      keepaliveSeconds: settings.keepaliveSeconds ?? 30,
      reconnectMs: settings.reconnectMs ?? 2000,
    };
    this.queue = new ReadingQueue(this.options.maxQueuedReadings);
  }

  get topic(): string {
    return `gateways/${this.gatewayId}/senml`;
  }

  get connected(): boolean {
    return this.client?.connected === true && this.linkUp;
  }

  stats(): GatewayLinkStats {
    let inFlightReadings = 0;
    for (const p of this.inFlight) inFlightReadings += p.readings.length;
    return {
      queued: this.queue.length,
      inFlightReadings,
      droppedReadings: this.queue.dropped,
      ...this.counters,
    };
  }

  /** Readings waiting or in flight. */
  get backlog(): number {
    let n = this.queue.length;
    for (const p of this.inFlight) n += p.readings.length;
    return n;
  }

  /** Opens the connection (MQTT.js reconnects by itself after a network failure). */
  start(): void {
    if (this.client || !this.linkUp) return;
    const id = this.gatewayId;
    const client = mqtt.connect(this.settings.url, {
      clientId: id,
      username: id,
      password: this.settings.credentials.secret,
      clean: false,
      protocolVersion: 4,
      keepalive: this.options.keepaliveSeconds,
      reconnectPeriod: this.options.reconnectMs,
      connectTimeout: 10_000,
      will: {
        topic: `gateways/${id}/status`,
        payload: Buffer.from('offline'),
        qos: 1,
        retain: true,
      },
    });
    this.client = client;
    client.on('connect', () => {
      this.counters.connects += 1;
      client.publish(`gateways/${id}/status`, 'online', { qos: 1, retain: true });
      client.subscribe(`gateways/${id}/rejects`, { qos: 1 });
      this.emit('connect');
      this.pump();
    });
    client.on('message', (_topic, payload) => this.onReject(payload));
    client.on('close', () => this.emit('close'));
    client.on('error', (error) => {
      // Refused credentials are not worth retrying forever at full speed; MQTT.js keeps trying
      // at the reconnect period, and the error is reported once per attempt.
      this.emit('error', error);
    });
  }

  /** Adds readings to the store-and-forward queue and sends what the link allows. */
  enqueue(readings: readonly OutgoingReading[], options: { sendPartial?: boolean } = {}): void {
    this.queue.push(readings);
    this.pump(options.sendPartial ?? true);
  }

  /** Sends what is queued, including a last partial pack. */
  flush(): void {
    this.pump(true);
  }

  /**
   * Simulates the site's radio link going down (the socket drops without a DISCONNECT, so the
   * broker publishes the will) or coming back. Readings keep queuing meanwhile.
   */
  async setLinkUp(up: boolean): Promise<void> {
    if (up === this.linkUp) return;
    this.linkUp = up;
    if (!up) {
      const client = this.client;
      this.client = null;
      if (client) await new Promise<void>((resolve) => client.end(true, {}, () => resolve()));
      // Packs without a PUBACK are sent again after the link returns.
      for (const pack of [...this.inFlight].reverse()) this.requeue(pack);
    } else {
      this.start();
    }
  }

  /**
   * Holds sending without touching the connection (history backfill replays an outage this
   * way: readings queue up and go when the hold is lifted).
   */
  hold(held: boolean): void {
    this.held = held;
    if (!held) this.pump();
  }

  /**
   * Publishes a raw payload (the bad-payload fault) at QoS 1; while the link is down it waits
   * with the readings (at most 100 are kept).
   */
  publishRaw(payload: string): void {
    this.rawQueue.push(payload);
    if (this.rawQueue.length > 100) this.rawQueue.shift();
    this.pump();
  }

  /** Resolves once nothing is queued or in flight (or rejects after `timeoutMs`). */
  drained(timeoutMs = 600_000): Promise<void> {
    this.flush();
    if (this.backlog === 0) return Promise.resolve();
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => {
        this.off('drained', done);
        reject(
          new Error(
            `${this.gatewayId}: ${this.backlog} readings still unsent after ${timeoutMs} ms`,
          ),
        );
      }, timeoutMs);
      const done = () => {
        clearTimeout(timer);
        resolve();
      };
      this.once('drained', done);
    });
  }

  /** Resolves once the backlog is at most `readings` (back-pressure for backfill). */
  async below(readings: number): Promise<void> {
    while (this.backlog > readings && !this.held && this.linkUp) {
      await new Promise<void>((resolve) => {
        const wake = () => {
          this.off('acked', wake);
          resolve();
        };
        this.on('acked', wake);
      });
    }
  }

  /** Says `offline` (retained) and disconnects; unsent readings stay in the queue. */
  async stop(): Promise<void> {
    this.closing = true;
    const client = this.client;
    this.client = null;
    if (!client) return;
    if (client.connected) {
      await Promise.race([
        new Promise<void>((resolve) =>
          client.publish(
            `gateways/${this.gatewayId}/status`,
            'offline',
            { qos: 1, retain: true },
            () => resolve(),
          ),
        ),
        new Promise<void>((resolve) => setTimeout(resolve, 5000)),
      ]);
    }
    // A graceful end waits for outstanding PUBACKs; do not wait for ever on a dead broker.
    await new Promise<void>((resolve) => {
      const force = setTimeout(() => {
        client.stream?.destroy();
        resolve();
      }, 5000);
      client.end(false, {}, () => {
        clearTimeout(force);
        resolve();
      });
    });
  }

  private pump(sendPartial = true): void {
    const client = this.client;
    if (!client || !client.connected || !this.linkUp || this.held || this.closing) return;
    for (const payload of this.rawQueue.splice(0)) client.publish(this.topic, payload, { qos: 1 });
    const max = this.options.maxRecordsPerPack;
    while (this.inFlight.size < this.options.maxPacksInFlight && this.queue.length > 0) {
      if (!sendPartial && this.queue.length < max) break;
      const pack: Pack = {
        readings: this.queue.take(max),
        settled: false,
        sentAt: performance.now(),
      };
      this.inFlight.add(pack);
      this.counters.sentPacks += 1;
      const payload = serialiseTelemetryPackJson(this.gatewayId, pack.readings);
      client.publish(this.topic, payload, { qos: 1 }, (error) => {
        if (pack.settled) return;
        if (error) {
          this.requeue(pack);
          return;
        }
        pack.settled = true;
        this.inFlight.delete(pack);
        this.counters.ackedPacks += 1;
        this.counters.ackedReadings += pack.readings.length;
        for (const r of pack.readings) if (r.t > this.ackedThroughT) this.ackedThroughT = r.t;
        this.emit('acked', performance.now() - pack.sentAt, pack.readings.length);
        if (this.backlog === 0) this.emit('drained');
        this.pump(sendPartial);
      });
    }
  }

  private requeue(pack: Pack): void {
    if (pack.settled) return;
    pack.settled = true;
    this.inFlight.delete(pack);
    this.queue.unshift(pack.readings);
  }

  private onReject(payload: Buffer): void {
    try {
      const notice = JSON.parse(payload.toString('utf8')) as RejectNotice;
      if (notice.packError) this.counters.rejectedPacks += 1;
      this.counters.rejectedRecords += notice.rejected?.length ?? 0;
      this.emit('reject', notice);
    } catch {
      // Not ours to judge: ingest's notices are JSON; anything else is ignored.
    }
  }
}
