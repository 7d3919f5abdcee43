import mqtt, { type MqttClient } from 'mqtt';
import type { SeededGateway } from './seed.js';

/** Seconds of sample time between two packs of one gateway. */
export const SAMPLE_SPACING_S = 10;
/** Records in every pack (see `packRecords`). */
export const RECORDS_PER_PACK = 4;

/**
 * What a gateway's pack number `seq` holds: one sample of pump switch, pump current, battery
 * voltage and tank level at `t0 + seq × SAMPLE_SPACING_S`. The pump runs for 6 samples out of
 * every 10 (so runs start and end, and pump runs are derived), and the tank rises while it runs.
 * The time encodes the sequence number: the database can be checked pack by pack.
 */
export function packRecords(gatewayId: string, t0: number, seq: number): unknown[] {
  const phase = seq % 10;
  const on = phase >= 2 && phase < 8;
  const cycle = Math.floor(seq / 10);
  const level = 0.5 + ((cycle % 50) * 0.02 + (on ? (phase - 1) * 0.003 : 0.018)) * 1;
  return [
    { bn: `urn:dev:wellkept:${gatewayId}:`, bt: t0 + seq * SAMPLE_SPACING_S },
    { n: 'pump/well/running', vb: on },
    { n: 'pump/well/current', u: 'A', v: on ? 6 + (seq % 7) / 10 : 0 },
    { n: 'battery/voltage', u: 'V', v: 24 + (seq % 100) / 50 },
    { n: 'tank/main/level', u: 'm', v: Number(level.toFixed(4)) },
  ];
}

/** One gateway: its MQTT.js client, what it sent and every PUBACK it got. */
export interface GatewayLog {
  gateway: SeededGateway;
  client: MqttClient;
  /** Pack number → when it was first published (ms). */
  published: Map<number, number>;
  /** Pack number → when its PUBACK arrived (ms); only the first acknowledgement counts. */
  acked: Map<number, number>;
  /** Packs published again on purpose (a gateway re-sending after a doubt). */
  republished: number;
  /** PUBLISH packets that left the client, re-sends after reconnecting included. */
  sends: number;
  next: number;
  /** Publishing in flight limit reached: wait for acknowledgements. */
  inflight: number;
}

export interface TelemetryGatewayOptions {
  mqttUrl: string;
  /** Sample time of pack 0, epoch seconds. */
  t0: number;
  /** Packs per second per gateway while publishing. */
  packsPerSecond: number;
  /** Unacknowledged packs a gateway keeps before it waits (its own buffer). */
  maxInflight: number;
  /** Every n-th pack, an earlier acknowledged pack is published again (0: never). */
  republishEvery: number;
}

/**
 * Gateways as the telemetry contract describes them: MQTT.js, client id = user name = gateway
 * id, clean: false, QoS 1, reconnecting after any refusal. MQTT.js keeps unacknowledged QoS 1
 * packs in its outgoing store and sends them again after reconnecting, which is exactly the
 * behaviour the "acknowledged means stored" guarantee relies on.
 */
export class TelemetryGateways {
  readonly logs: GatewayLog[] = [];
  private timer: NodeJS.Timeout | undefined;
  /** Connection events (close/reconnect) seen, for the report. */
  reconnects = 0;

  constructor(
    gateways: SeededGateway[],
    private readonly options: TelemetryGatewayOptions,
  ) {
    for (const gateway of gateways) {
      const client = mqtt.connect(options.mqttUrl, {
        clientId: gateway.gatewayId,
        username: gateway.gatewayId,
        password: gateway.secret,
        clean: false,
        protocolVersion: 4,
        keepalive: 30,
        reconnectPeriod: 250,
        // CONNACK 3 while the database is away: keep trying (docs/telemetry.md).
        reconnectOnConnackError: true,
        connectTimeout: 5000,
        resubscribe: false,
      });
      client.on('error', () => undefined);
      client.on('reconnect', () => (this.reconnects += 1));
      const log: GatewayLog = {
        gateway,
        client,
        published: new Map(),
        acked: new Map(),
        republished: 0,
        sends: 0,
        next: 0,
        inflight: 0,
      };
      client.on('packetsend', (packet) => {
        if (packet.cmd === 'publish') log.sends += 1;
      });
      this.logs.push(log);
    }
  }

  async connected(timeoutMs = 30_000): Promise<void> {
    await Promise.all(
      this.logs.map(
        (log) =>
          new Promise<void>((resolve, reject) => {
            if (log.client.connected) return resolve();
            const timer = setTimeout(
              () => reject(new Error(`${log.gateway.gatewayId} did not connect`)),
              timeoutMs,
            );
            log.client.once('connect', () => {
              clearTimeout(timer);
              resolve();
            });
          }),
      ),
    );
  }

  /** Starts publishing at the configured rate (spread evenly over the gateways). */
  startPublishing(): void {
    if (this.timer) return;
    const tickMs = 50;
    let credit = 0;
    let cursor = 0;
    const perTick = (this.options.packsPerSecond * this.logs.length * tickMs) / 1000;
    this.timer = setInterval(() => {
      credit += perTick;
      while (credit >= 1) {
        credit -= 1;
        const log = this.logs[cursor % this.logs.length]!;
        cursor += 1;
        if (log.inflight < this.options.maxInflight) this.publishNext(log);
      }
    }, tickMs);
  }

  stopPublishing(): void {
    clearInterval(this.timer);
    this.timer = undefined;
  }

  private publishNext(log: GatewayLog): void {
    const seq = log.next++;
    this.publish(log, seq);
    const every = this.options.republishEvery;
    if (every > 0 && seq > 0 && seq % every === 0) {
      // A duplicate of an acknowledged pack: it must be stored once, not twice.
      const earlier = [...log.acked.keys()].at(-1);
      if (earlier !== undefined) {
        log.republished += 1;
        this.publish(log, earlier);
      }
    }
  }

  private publish(log: GatewayLog, seq: number): void {
    if (!log.published.has(seq)) log.published.set(seq, Date.now());
    log.inflight += 1;
    const payload = JSON.stringify(packRecords(log.gateway.gatewayId, this.options.t0, seq));
    log.client.publish(`gateways/${log.gateway.gatewayId}/senml`, payload, { qos: 1 }, (error) => {
      log.inflight -= 1;
      // MQTT.js calls back without an error only when the PUBACK arrived.
      if (!error && !log.acked.has(seq)) log.acked.set(seq, Date.now());
    });
  }

  /** Packs that reached the broker more than once (re-sends and deliberate repeats). */
  static duplicateSends(log: GatewayLog): number {
    return log.sends - log.published.size;
  }

  /** Packs published but not yet acknowledged, over every gateway. */
  unacknowledged(): number {
    let n = 0;
    for (const log of this.logs) n += log.published.size - log.acked.size;
    return n;
  }

  /** Waits until every published pack is acknowledged (or the time is up). */
  async drained(timeoutMs: number): Promise<boolean> {
    const until = Date.now() + timeoutMs;
    while (this.unacknowledged() > 0) {
      if (Date.now() > until) return false;
      await new Promise((r) => setTimeout(r, 100));
    }
    return true;
  }

  /** The first PUBACK at or after `since` (ms), over every gateway, or null. */
  firstAckSince(since: number): number | null {
    let first: number | null = null;
    for (const log of this.logs)
      for (const at of log.acked.values())
        if (at >= since && (first === null || at < first)) first = at;
    return first;
  }

  async close(): Promise<void> {
    this.stopPublishing();
    await Promise.all(
      this.logs.map(
        (log) => new Promise<void>((resolve) => log.client.end(true, {}, () => resolve())),
      ),
    );
  }
}
