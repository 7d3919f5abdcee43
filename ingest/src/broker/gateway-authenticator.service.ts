import { Inject, Injectable } from '@nestjs/common';
import { verifyGatewaySecret } from '@wellkept/db';
import type { Logger } from 'pino';
import { INGEST_CONFIG, type IngestConfig } from '../config/ingest-config.js';
import { GatewaysRepository } from '../gateways/gateways.repository.js';
import { LOGGER } from '../logging/logger.js';
import { MetricsService } from '../metrics/metrics.service.js';
import type { GatewaySession } from '../telemetry/pack-intake.service.js';
import { GatewayRateLimiter } from './gateway-rate-limits.js';

/** Why a CONNECT was refused, with the MQTT 3.1.1 CONNACK return code to send. */
export class ConnectRefusal extends Error {
  constructor(
    readonly returnCode: 2 | 3 | 4 | 5,
    message: string,
  ) {
    super(message);
  }
}

/** Failures remembered per gateway id and per address for this long. */
const FAILURE_MEMORY_MS = 15 * 60_000;
const MAX_DELAY_MS = 5_000;
const MAX_TRACKED = 50_000;

interface Failures {
  count: number;
  last: number;
}

/**
 * Checks a gateway's CONNECT: client id = username = an existing, unrevoked gateway id, and the
 * password is its secret (sha256 compared in constant time by @wellkept/db). Failed attempts
 * are slowed: the refusal of the n-th recent failure for a gateway id or address waits
 * 250 ms × 2^(n−1), up to 5 s, and any attempt on a gateway id with recent failures waits as
 * long before it is checked. Secrets never reach a log line.
 *
 * A gateway that connects successfully too often (a reconnect loop, or a stolen secret used
 * to flood) is refused with return code 3 until its connect bucket refills; only accepted
 * connections count, so someone who merely knows a gateway id cannot lock it out this way.
 * The same limiter holds back a gateway's publishes (see BrokerService.authorizePublish).
 */
@Injectable()
export class GatewayAuthenticator {
  private readonly failures = new Map<string, Failures>();
  /** Per-gateway connect and publish limits, shared with the broker. */
  readonly limits: GatewayRateLimiter;
  /** When each throttled gateway was last logged, so a flood does not flood the log too. */
  private readonly throttleLogged = new Map<string, number>();

  constructor(
    private readonly gateways: GatewaysRepository,
    private readonly metrics: MetricsService,
    @Inject(INGEST_CONFIG) config: IngestConfig,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {
    this.limits = new GatewayRateLimiter(config.gatewayLimits);
  }

  /** Counts a throttled connect or publish, logging each gateway at most once a minute. */
  noteThrottled(kind: 'connect' | 'publish', gatewayId: string, detail: object): void {
    this.metrics.throttled.inc({ kind });
    const now = Date.now();
    if (now - (this.throttleLogged.get(gatewayId) ?? 0) < 60_000) return;
    if (this.throttleLogged.size > 10_000) this.throttleLogged.clear();
    this.throttleLogged.set(gatewayId, now);
    this.logger.warn({ gatewayId, kind, ...detail }, 'gateway over its rate limit');
  }

  async authenticate(
    clientId: string,
    username: string | undefined,
    password: Buffer | undefined,
    address: string,
  ): Promise<GatewaySession> {
    const idKey = `id:${username ?? ''}`;
    const keys = [idKey, `ip:${address}`];
    // A gateway id under attack answers slowly for everyone trying it; other gateways behind
    // the same address are not held up unless they fail too.
    await sleep(this.delayFor([idKey]));
    const wait = username ? this.limits.connectWaitMs(username) : 0;
    if (wait > 0) {
      this.noteThrottled('connect', username ?? '', { retryInMs: wait });
      throw new ConnectRefusal(
        3,
        `gateway connects too often; try again in ${Math.ceil(wait / 1000)} s`,
      );
    }
    try {
      const session = await this.check(clientId, username, password);
      this.failures.delete(idKey);
      this.limits.takeConnect(session.gatewayId);
      return session;
    } catch (error) {
      if (error instanceof ConnectRefusal && error.returnCode !== 3) {
        this.recordFailure(keys);
        this.logger.warn(
          { gatewayId: username, address, reason: error.message },
          'gateway connection refused',
        );
        await sleep(this.delayFor(keys));
      }
      throw error;
    }
  }

  private async check(
    clientId: string,
    username: string | undefined,
    password: Buffer | undefined,
  ): Promise<GatewaySession> {
    if (!username || !password || password.length === 0) {
      throw new ConnectRefusal(4, 'user name (gateway id) and password (secret) are required');
    }
    if (clientId !== username) {
      throw new ConnectRefusal(2, 'client id must equal the user name (the gateway id)');
    }
    let gateway;
    try {
      gateway = await this.gateways.findCredentials(username);
    } catch (error) {
      this.logger.error({ err: error }, 'gateway lookup failed');
      throw new ConnectRefusal(3, 'database unavailable');
    }
    // The same answer for unknown, revoked and wrong-secret, so ids cannot be probed.
    const ok =
      gateway !== null &&
      !gateway.revoked &&
      verifyGatewaySecret(password.toString('utf8'), gateway.secretHash);
    if (!ok || !gateway) throw new ConnectRefusal(4, 'unknown or revoked gateway, or wrong secret');
    return {
      gatewayId: gateway.id,
      siteId: gateway.siteId,
      batteryNominalVolts: gateway.batteryNominalVolts,
    };
  }

  private delayFor(keys: readonly string[]): number {
    const now = Date.now();
    let count = 0;
    for (const key of keys) {
      const f = this.failures.get(key);
      if (f && now - f.last < FAILURE_MEMORY_MS) count = Math.max(count, f.count);
    }
    return count === 0 ? 0 : Math.min(MAX_DELAY_MS, 250 * 2 ** (count - 1));
  }

  private recordFailure(keys: readonly string[]): void {
    const now = Date.now();
    if (this.failures.size > MAX_TRACKED) {
      for (const [key, f] of this.failures) {
        if (now - f.last >= FAILURE_MEMORY_MS) this.failures.delete(key);
      }
    }
    for (const key of keys) {
      const f = this.failures.get(key);
      const fresh = f && now - f.last < FAILURE_MEMORY_MS;
      this.failures.set(key, { count: fresh ? f.count + 1 : 1, last: now });
    }
  }
}

function sleep(ms: number): Promise<void> {
  return ms > 0 ? new Promise((resolve) => setTimeout(resolve, ms)) : Promise.resolve();
}
