import { Readable } from 'node:stream';
import AsyncRedisPersistence from 'aedes-persistence-redis/asyncPersistence.js';
import MQEmitterRedis from 'mqemitter-redis';
import type { Logger } from 'pino';
import { TOPIC_PREFIX } from './topics.js';

/** A message as aedes hands it to its emitter. */
interface EmittedMessage {
  topic: string;
  [key: string]: unknown;
}

/** The emitter and persistence given to aedes in shared mode, and how to close them. */
export interface SharedBrokerState {
  /** aedes `mq`: messages between the nodes (Redis pub/sub). */
  mq: MQEmitterRedis.MQEmitterRedis;
  /** aedes `persistence`: sessions, subscriptions, retained messages, queued QoS 1, wills. */
  persistence: RedisPersistenceForAedes;
  /**
   * Calls `listener` with the client id of every connection that another node accepts. It
   * must be registered before the broker is created: aedes closes the local connection with
   * that id from its own listener on the same topic, and listeners run in the order they
   * were added, so ours sees the takeover before the closing connection publishes its will.
   */
  onConnectElsewhere(brokerId: string, listener: (clientId: string) => void): void;
  close(): Promise<void>;
}

/**
 * aedes 1.2 sends the retained messages of a new subscription with `stream.pipe(...)`
 * (lib/handlers/subscribe.js), while aedes-persistence-redis 12 returns an async generator
 * there (a subscriber to a topic with a retained message crashed the process with
 * "stream.pipe is not a function"). Its other streams are only iterated, which works as is.
 */
class RedisPersistenceForAedes extends AsyncRedisPersistence {
  override createRetainedStreamCombi(patterns: string[]): Readable {
    return Readable.from(super.createRetainedStreamCombi(patterns));
  }
}

/** Telemetry (`gateways/<id>/senml`) is stored by the node that receives it. */
function isTelemetry(topic: string): boolean {
  return topic.startsWith(TOPIC_PREFIX) && topic.endsWith('/senml');
}

/** Connection options for ioredis from a redis:// or rediss:// URL. */
export function redisOptions(url: string) {
  const u = new URL(url);
  const db = u.pathname.length > 1 ? Number(u.pathname.slice(1)) : 0;
  if (!Number.isInteger(db) || db < 0) throw new Error(`REDIS_URL: "${u.pathname}" is not a db`);
  return {
    host: u.hostname,
    port: u.port ? Number(u.port) : 6379,
    username: u.username ? decodeURIComponent(u.username) : undefined,
    password: u.password ? decodeURIComponent(u.password) : undefined,
    db,
    tls: u.protocol === 'rediss:' ? {} : undefined,
    // While Redis is unreachable, commands wait for it to come back instead of failing after
    // 20 retries: aedes-persistence-redis issues some commands without awaiting them, and
    // their rejection would end the process. Telemetry does not wait on Redis (see below).
    maxRetriesPerRequest: null,
  };
}

/** Waits for `work`, but no longer than `ms` (shutdown must finish with Redis gone). */
export async function settleWithin(work: Promise<unknown>, ms: number): Promise<void> {
  let timer: NodeJS.Timeout | undefined;
  await Promise.race([
    work.catch(() => undefined),
    new Promise((resolve) => (timer = setTimeout(resolve, ms))),
  ]);
  clearTimeout(timer);
}

/**
 * Shared mode: aedes keeps its state in Redis (aedes-persistence-redis) and the nodes pass
 * messages to each other over Redis pub/sub (mqemitter-redis). That carries what must reach a
 * gateway whichever node holds it: messages sent down to gateways, retained status messages,
 * subscriptions of persistent sessions, and aedes's notice that a client id connected
 * elsewhere (which closes the older connection).
 *
 * Telemetry packs are the bulk of the traffic and no other node needs them (the receiving node
 * stores them), so they are delivered inside this process only instead of through Redis.
 */
export function createSharedBrokerState(redisUrl: string, logger: Logger): SharedBrokerState {
  const options = redisOptions(redisUrl);
  const mq = MQEmitterRedis({ ...options });
  const shared = mq as unknown as {
    emit: (m: EmittedMessage, done?: (e?: Error) => void) => void;
    /** mqemitter-redis keeps the in-process MQEmitter `emit` under this name. */
    _emit: (m: EmittedMessage, done?: (e?: Error) => void) => void;
    state: NodeJS.EventEmitter;
    /** mqemitter-redis's publishing connection (an ioredis client). */
    pubConn: { duplicate(): NodeJS.EventEmitter };
  };
  const throughRedis = shared.emit.bind(mq);
  const inProcess = shared._emit.bind(mq);
  shared.emit = (message, done) =>
    isTelemetry(message.topic) ? inProcess(message, done) : throughRedis(message, done);

  // Connection errors repeat at every retry while Redis is down: say it once, then once more
  // when it is back. Without listeners an 'error' event would end the process (or, for the
  // persistence's connection, print ioredis's own unhandled-error lines).
  let down = false;
  const failed = (error: Error) => {
    if (down) return logger.debug({ err: error.message }, 'Redis still unreachable');
    down = true;
    logger.warn({ err: error.message }, 'shared broker state: Redis unreachable; retrying');
  };
  const ready = () => {
    if (!down) return;
    down = false;
    logger.info('shared broker state: Redis reachable again');
  };
  shared.state.on('error', failed);
  shared.state.on('pubConnect', ready);
  // The persistence's own connection, with the same options (ioredis `duplicate`).
  const conn = shared.pubConn.duplicate();
  conn.on('error', failed);
  conn.on('ready', ready);
  const persistence = new RedisPersistenceForAedes({ conn, maxSessionDelivery: 1000 });

  return {
    mq,
    persistence,
    onConnectElsewhere(brokerId, listener) {
      mq.on('$SYS/+/new/clients', (packet, done) => {
        const from = packet.topic.split('/')[1];
        if (from !== brokerId) listener(String(packet.payload));
        done();
      });
    },
    async close() {
      // aedes.close() has already closed the emitter; the persistence is ours to close.
      await settleWithin(persistence.destroy(), 3000);
    },
  };
}
