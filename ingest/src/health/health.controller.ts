import { Controller, Get, Inject, Res } from '@nestjs/common';
import type { FastifyReply } from 'fastify';
import { sql } from 'kysely';
import { BrokerService } from '../broker/broker.service.js';
import { DATABASE, type Database } from '../database/database.js';

export interface HealthReport {
  status: 'ok' | 'failing';
  database: { ok: boolean; error?: string };
  broker: { ok: boolean; connectedGateways: number };
}

/** `/health`: 200 when the database answers and the broker listens, 503 otherwise. */
@Controller('health')
export class HealthController {
  constructor(
    @Inject(DATABASE) private readonly db: Database,
    private readonly broker: BrokerService,
  ) {}

  @Get()
  async check(@Res({ passthrough: true }) reply: FastifyReply): Promise<HealthReport> {
    let database: HealthReport['database'];
    try {
      await withTimeout(sql`select 1`.execute(this.db), 2000);
      database = { ok: true };
    } catch (error) {
      database = { ok: false, error: (error as Error).message };
    }
    const broker = { ok: this.broker.isListening, connectedGateways: this.broker.connectedClients };
    const ok = database.ok && broker.ok;
    reply.status(ok ? 200 : 503);
    return { status: ok ? 'ok' : 'failing', database, broker };
  }
}

function withTimeout<T>(promise: Promise<T>, ms: number): Promise<T> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`no answer within ${ms} ms`)), ms);
    promise.then(
      (v) => (clearTimeout(timer), resolve(v)),
      (e: unknown) => (clearTimeout(timer), reject(e instanceof Error ? e : new Error(String(e)))),
    );
  });
}
