import { randomUUID } from 'node:crypto';
import { createServer as createHttpServer, type Server as HttpServer } from 'node:http';
import { createServer as createHttpsServer } from 'node:https';
import {
  createServer as createNetServer,
  type AddressInfo,
  type Server,
  type Socket,
} from 'node:net';
import type { Duplex } from 'node:stream';
import { createServer as createTlsServer } from 'node:tls';
import {
  Inject,
  Injectable,
  type BeforeApplicationShutdown,
  type OnApplicationBootstrap,
} from '@nestjs/common';
import { Aedes, type AuthenticateError, type Client, type PublishPacket } from 'aedes';
import type { Logger } from 'pino';
import { WebSocketServer, createWebSocketStream } from 'ws';
import { INGEST_CONFIG, type IngestConfig } from '../config/ingest-config.js';
import { GatewayPresenceService } from '../gateways/gateway-presence.service.js';
import { LOGGER } from '../logging/logger.js';
import { MetricsService } from '../metrics/metrics.service.js';
import { GroupCommitWriter } from '../telemetry/group-commit-writer.js';
import {
  PackIntakeService,
  type GatewaySession,
  type RejectsReport,
} from '../telemetry/pack-intake.service.js';
import { ConnectionGate } from './connection-gate.js';
import { ConnectRefusal, GatewayAuthenticator } from './gateway-authenticator.service.js';
import { guardPacketSize } from './packet-size-guard.js';
import {
  createSharedBrokerState,
  settleWithin,
  type SharedBrokerState,
} from './shared-broker-state.js';
import { maySubscribe, publishableKind, rejectsTopic } from './topics.js';

/** Set in preConnect when the CONNECT carried an empty client id (aedes then invents one). */
const EMPTY_CLIENT_ID = Symbol('emptyClientId');
type TaggedClient = Client & { [EMPTY_CLIENT_ID]?: boolean };

/**
 * The embedded MQTT broker (aedes) on a TCP port (TLS when configured) and on a WebSocket port.
 *
 * The PUBACK of a telemetry pack waits for its database commit: aedes calls `authorizePublish`
 * before it writes the PUBACK (lib/handlers/publish.js), so that hook hands the pack to the
 * group-commit writer and calls back only after the commit. An error from the hook makes aedes
 * close the connection without a PUBACK, and the gateway re-sends after reconnecting. While a
 * connection's packets wait, aedes reads nothing more from its socket, which holds back a
 * gateway that sends faster than the database commits.
 */
@Injectable()
export class BrokerService implements OnApplicationBootstrap, BeforeApplicationShutdown {
  private broker: Aedes | undefined;
  private mqttServer: Server | undefined;
  private wsHttpServer: HttpServer | undefined;
  private wsServer: WebSocketServer | undefined;
  private readonly sessions = new WeakMap<Client, GatewaySession>();
  /** The socket under each guarded connection (to cork it while a batch is answered). */
  private readonly sockets = new WeakMap<object, Duplex>();
  /** Every open socket, to cut what is left when the service stops. */
  private readonly openSockets = new Set<Duplex>();
  private readonly gate: ConnectionGate;
  private listening = false;
  /** Redis-backed broker state when several ingest nodes share it (INGEST_BROKER_MODE=shared). */
  private shared: SharedBrokerState | undefined;
  /** Connections closed because the same gateway connected to another node. */
  private readonly replacedElsewhere = new WeakSet<Client>();

  constructor(
    private readonly authenticator: GatewayAuthenticator,
    private readonly intake: PackIntakeService,
    private readonly writer: GroupCommitWriter,
    private readonly presence: GatewayPresenceService,
    private readonly metrics: MetricsService,
    @Inject(INGEST_CONFIG) private readonly config: IngestConfig,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {
    this.gate = new ConnectionGate(config.maxConnections);
  }

  /** Ports actually bound (tests listen on port 0). */
  get ports(): { mqtt: number; ws: number } {
    return {
      mqtt: (this.mqttServer?.address() as AddressInfo | null)?.port ?? 0,
      ws: (this.wsHttpServer?.address() as AddressInfo | null)?.port ?? 0,
    };
  }

  get isListening(): boolean {
    return this.listening;
  }

  get connectedClients(): number {
    return this.broker?.connectedClients ?? 0;
  }

  async onApplicationBootstrap(): Promise<void> {
    const id = `ingest-${randomUUID()}`;
    if (this.config.broker.mode === 'shared') {
      this.shared = createSharedBrokerState(this.config.broker.redisUrl, this.logger);
      // Before createBroker, so this runs before aedes closes the older connection (see there).
      this.shared.onConnectElsewhere(id, (clientId) => {
        const local = this.broker && localClients(this.broker)[clientId];
        if (local) this.replacedElsewhere.add(local);
      });
    }
    const broker = await Aedes.createBroker({
      id,
      ...(this.shared ? { mq: this.shared.mq, persistence: this.shared.persistence } : {}),
      // Gateways reconnect on their own; a socket that never drains is cut after 30 s.
      drainTimeout: 30_000,
      preConnect: (client, packet, done) => {
        if (!packet.clientId) (client as TaggedClient)[EMPTY_CLIENT_ID] = true;
        done(null, !this.closing);
      },
      authenticate: (client, username, password, done) => {
        this.authenticate(client as TaggedClient, username, password, done);
      },
      authorizePublish: (client, packet, done) => this.throttlePublish(client, packet, done),
      authorizeSubscribe: (client, subscription, done) => {
        const session = this.sessions.get(client);
        if (!session || !maySubscribe(session.gatewayId, subscription.topic)) {
          this.logger.info(
            { gatewayId: session?.gatewayId, topic: subscription.topic },
            'subscription refused',
          );
          done(null, null);
          return;
        }
        done(null, { ...subscription, qos: Math.min(subscription.qos, 1) as 0 | 1 });
      },
    });
    this.broker = broker;
    broker.on('clientReady', (client) => {
      const session = this.sessions.get(client);
      this.metrics.connectedGateways.set(broker.connectedClients);
      if (session) this.presence.setOnline(session.gatewayId, session.siteId, true);
    });
    broker.on('clientDisconnect', (client) => {
      this.metrics.connectedGateways.set(broker.connectedClients);
      const session = this.sessions.get(client);
      // A gateway that reconnected elsewhere (replacing this connection) is still online.
      const current = localClients(broker)[client.id];
      const replaced = (current && current !== client) || this.replacedElsewhere.has(client);
      if (session && !replaced) {
        this.presence.setOnline(session.gatewayId, session.siteId, false);
      }
    });
    // Shared mode: a Redis failure while queueing a message for a session surfaces here.
    // (aedes emits it but its typings do not list it.)
    (broker as unknown as NodeJS.EventEmitter).on('error', (error: Error) => {
      this.logger.warn({ err: error.message }, 'broker error');
    });
    broker.on('clientError', (client, error) => {
      this.logger.debug({ gatewayId: client.id, err: error.message }, 'client error');
    });

    const handle = (socket: Duplex & { remoteAddress?: string }, kind: 'tcp' | 'ws'): void => {
      const release = this.gate.admit();
      if (!release || this.closing) {
        this.metrics.refusedConnections.inc({ reason: this.closing ? 'closing' : 'too_many' });
        socket.destroy();
        return;
      }
      this.openSockets.add(socket);
      socket.on('close', () => {
        release();
        this.openSockets.delete(socket);
      });
      socket.on('error', () => undefined);
      const guarded = guardPacketSize(socket, this.config.maxPacketBytes, (error) => {
        this.metrics.refusedConnections.inc({ reason: 'packet_too_large' });
        this.logger.warn(
          { kind, address: socket.remoteAddress, err: error.message },
          'connection cut',
        );
      });
      (guarded as Duplex & { remoteAddress?: string }).remoteAddress = socket.remoteAddress;
      this.sockets.set(guarded, socket);
      broker.handle(guarded);
    };

    const onSocket = (socket: Socket) => {
      socket.setNoDelay(true);
      handle(socket, 'tcp');
    };
    this.mqttServer = this.config.tls
      ? createTlsServer({ cert: this.config.tls.cert, key: this.config.tls.key }, onSocket)
      : createNetServer(onSocket);
    this.wsHttpServer = this.config.tls
      ? createHttpsServer({ cert: this.config.tls.cert, key: this.config.tls.key })
      : createHttpServer();
    this.wsServer = new WebSocketServer({
      server: this.wsHttpServer,
      maxPayload: this.config.maxPacketBytes,
    });
    this.wsServer.on('connection', (ws, request) => {
      const stream = createWebSocketStream(ws) as Duplex & { remoteAddress?: string };
      stream.remoteAddress = request.socket.remoteAddress;
      handle(stream, 'ws');
    });
    await listen(this.mqttServer, this.config.mqttPort, this.config.host);
    await listen(this.wsHttpServer, this.config.mqttWsPort, this.config.host);
    this.listening = true;
    this.logger.info(
      { mqtt: this.ports.mqtt, ws: this.ports.ws, tls: Boolean(this.config.tls) },
      'MQTT broker listening',
    );
  }

  private closing = false;

  /** Graceful stop: refuse new connections, commit what is queued (PUBACKs go out), then close. */
  async beforeApplicationShutdown(): Promise<void> {
    this.closing = true;
    this.listening = false;
    const closed = Promise.all([closeServer(this.mqttServer), closeServer(this.wsHttpServer)]);
    await this.writer.flush();
    const brokerClosed = new Promise<void>((resolve) =>
      this.broker ? this.broker.close(resolve) : resolve(),
    );
    // In shared mode closing waits on Redis (sessions, wills); do not hang on a lost Redis.
    await (this.shared ? settleWithin(brokerClosed, 5000) : brokerClosed);
    await this.shared?.close();
    for (const socket of this.openSockets) socket.destroy();
    this.wsServer?.close();
    await closed;
    this.logger.info('MQTT broker closed');
  }

  private authenticate(
    client: TaggedClient,
    username: string | undefined,
    password: Buffer | undefined,
    done: (error: AuthenticateError | null, success: boolean | null) => void,
  ): void {
    const address = (client.conn as { remoteAddress?: string }).remoteAddress ?? 'unknown';
    const refuse = (returnCode: 2 | 3 | 4 | 5, message: string) => {
      this.metrics.refusedConnections.inc({ reason: `connack_${returnCode}` });
      done(Object.assign(new Error(message), { returnCode }) as AuthenticateError, false);
    };
    if (this.closing) {
      refuse(3, 'shutting down');
      return;
    }
    if (client[EMPTY_CLIENT_ID] && !client.clean) {
      // MQTT 3.1.1 [MQTT-3.1.3-8]: an empty client id needs CleanSession=1.
      refuse(2, 'empty client id with clean session off');
      return;
    }
    if (client[EMPTY_CLIENT_ID]) {
      refuse(2, 'client id must be the gateway id');
      return;
    }
    this.authenticator.authenticate(client.id, username, password, address).then(
      (session) => {
        this.sessions.set(client, session);
        done(null, true);
      },
      (error: unknown) => {
        if (error instanceof ConnectRefusal) refuse(error.returnCode, error.message);
        else {
          this.logger.error({ err: error }, 'authentication failed unexpectedly');
          refuse(3, 'server unavailable');
        }
      },
    );
  }

  /**
   * Holds a publish while its gateway is over the publish rate (GatewayRateLimiter): aedes
   * reads nothing more from that socket meanwhile, so a flooding gateway slows down on its own
   * and others are not starved. Holds keep arrival order; a backlog longer than the limit's
   * maximum hold closes the connection without a PUBACK (the gateway re-sends later).
   */
  private throttlePublish(
    client: Client | null,
    packet: PublishPacket,
    done: (error?: Error | null) => void,
  ): void {
    const gatewayId = client ? this.sessions.get(client)?.gatewayId : undefined;
    const hold = gatewayId ? this.authenticator.limits.reservePublish(gatewayId) : 0;
    if (hold === 0) {
      this.authorizePublish(client, packet, done);
      return;
    }
    this.authenticator.noteThrottled('publish', gatewayId!, { holdMs: hold });
    if (hold === null) {
      done(new Error('publishing faster than the gateway publish limit allows'));
      return;
    }
    setTimeout(() => this.authorizePublish(client, packet, done), hold);
  }

  private authorizePublish(
    client: Client | null,
    packet: PublishPacket,
    done: (error?: Error | null) => void,
  ): void {
    if (!client) {
      done(null); // the broker's own messages (rejects reports)
      return;
    }
    const session = this.sessions.get(client);
    const kind = session ? publishableKind(session.gatewayId, packet.topic) : null;
    if (!session || !kind) {
      this.metrics.refusedConnections.inc({ reason: 'foreign_topic' });
      this.logger.warn(
        { gatewayId: session?.gatewayId ?? client.id, topic: packet.topic.slice(0, 200) },
        'publish outside the gateway topic tree; closing the connection',
      );
      done(new Error(`not allowed to publish to ${packet.topic.slice(0, 200)}`));
      return;
    }
    if (kind === 'status') {
      if (this.replacedElsewhere.has(client)) {
        // The will of a connection replaced from another node: the gateway is online there.
        done(new Error('connection replaced on another ingest node'));
        return;
      }
      const willOf = (packet as PublishPacket & { brokerId?: string }).brokerId;
      if (willOf && willOf !== this.broker?.id) {
        // A will left by an ingest node that died, published late by this node while the
        // gateway is already connected here again: deliver it, but keep the retained status
        // and the recorded state (online).
        packet.retain = false;
        done(null);
        return;
      }
      const state = packet.payload.toString('utf8').trim();
      if (state === 'online' || state === 'offline') {
        this.presence.setOnline(session.gatewayId, session.siteId, state === 'online');
      }
      done(null);
      return;
    }
    // Telemetry is stored, not retained for later subscribers.
    packet.retain = false;
    this.presence.seen(session.gatewayId);
    const payload =
      typeof packet.payload === 'string' ? Buffer.from(packet.payload) : packet.payload;
    this.intake.receive(session, payload, packet.messageId, (error, report) => {
      if (error) {
        done(error);
        return;
      }
      if (report) this.publishRejects(session.gatewayId, report);
      // A committed batch answers many packs of a connection in one go: cork its socket so
      // their PUBACKs leave in one write instead of one system call each.
      const socket = this.sockets.get(client.conn);
      if (socket && !socket.destroyed) {
        socket.cork();
        process.nextTick(() => socket.uncork());
      }
      done(null);
    });
  }

  private publishRejects(gatewayId: string, report: RejectsReport): void {
    this.broker?.publish(
      {
        cmd: 'publish',
        topic: rejectsTopic(gatewayId),
        payload: Buffer.from(JSON.stringify(report)),
        qos: 1,
        retain: false,
        dup: false,
      },
      (error) => {
        if (error) this.logger.warn({ gatewayId, err: error }, 'could not publish rejects');
      },
    );
  }
}

/** aedes's map of the connections this node holds, by client id (not in its typings). */
function localClients(broker: Aedes): Record<string, Client | undefined> {
  return (broker as unknown as { clients: Record<string, Client | undefined> }).clients;
}

function listen(server: Server | HttpServer, port: number, host: string): Promise<void> {
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
}

function closeServer(server: Server | HttpServer | undefined): Promise<void> {
  return new Promise((resolve) => (server ? server.close(() => resolve()) : resolve()));
}
