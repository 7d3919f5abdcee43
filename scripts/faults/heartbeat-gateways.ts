import mqtt, { type MqttClient } from 'mqtt';
import type { SeededGateway } from './seed.js';

/**
 * Gateways of sites that report every second, used to make alert mail due on demand: while they
 * publish, their sites are healthy; when they pause for more than five reporting intervals, the
 * real rules open "gateway silent" and ingest writes alert mail; when they publish again the
 * alerts clear and the clear mail is written. Packs carry no time, so each is stamped when
 * ingest receives it.
 */
export class HeartbeatGateways {
  private readonly clients: MqttClient[] = [];
  private timer: NodeJS.Timeout | undefined;

  constructor(
    private readonly gateways: SeededGateway[],
    mqttUrl: string,
    private readonly everyMs = 400,
  ) {
    for (const g of gateways) {
      const client = mqtt.connect(mqttUrl, {
        clientId: g.gatewayId,
        username: g.gatewayId,
        password: g.secret,
        clean: false,
        protocolVersion: 4,
        reconnectPeriod: 250,
        reconnectOnConnackError: true,
        connectTimeout: 5000,
        resubscribe: false,
      });
      client.on('error', () => undefined);
      this.clients.push(client);
    }
  }

  get beating(): boolean {
    return Boolean(this.timer);
  }

  start(): void {
    if (this.timer) return;
    const beat = () => {
      this.clients.forEach((client, i) => {
        const id = this.gateways[i]!.gatewayId;
        // Offline, MQTT.js queues QoS 1 packs and sends them after reconnecting; do not pile up.
        if (!client.connected) return;
        client.publish(
          `gateways/${id}/senml`,
          JSON.stringify([
            { bn: `urn:dev:wellkept:${id}:`, n: 'battery/voltage', u: 'V', v: 25.2 },
          ]),
          { qos: 1 },
        );
      });
    };
    beat();
    this.timer = setInterval(beat, this.everyMs);
  }

  stop(): void {
    clearInterval(this.timer);
    this.timer = undefined;
  }

  async close(): Promise<void> {
    this.stop();
    await Promise.all(
      this.clients.map((c) => new Promise<void>((resolve) => c.end(true, {}, () => resolve()))),
    );
  }
}
