import { Injectable } from '@nestjs/common';
import { type Database, hashGatewaySecret, newGatewaySecret } from '@wellkept/db';
import { sql } from 'kysely';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { AuditRepository } from '../audit/audit.repository.js';
import { conflict, notFound } from '../common/api-error.js';
import { InjectDb } from '../database/database.module.js';
import type { GatewayDto } from './dto/gateways.dto.js';

type GatewayRow = {
  id: string;
  name: string;
  online: boolean;
  last_seen_at: Date | null;
  created_at: Date;
  rotated_at: Date | null;
  revoked_at: Date | null;
};
const COLUMNS = [
  'id',
  'name',
  'online',
  'last_seen_at',
  'created_at',
  'rotated_at',
  'revoked_at',
] as const;

/**
 * Gateways of a site. Secrets are random tokens stored as a hash (db/gateway-secrets); the
 * plain secret leaves the server only in the answer to create and rotate. Changes NOTIFY
 * `site_updates` with what "gateway" so ingest drops cached credentials.
 */
@Injectable()
export class GatewaysService {
  constructor(
    @InjectDb() private readonly db: Database,
    private readonly audit: AuditRepository,
  ) {}

  async list(site: VisibleSite): Promise<GatewayDto[]> {
    const rows = await this.db
      .selectFrom('gateways')
      .select(COLUMNS)
      .where('site_id', '=', site.id)
      .orderBy('id')
      .execute();
    return rows.map(toDto);
  }

  async create(user: SessionUser, site: VisibleSite, body: { id: string; name: string }) {
    const secret = newGatewaySecret();
    const row = await this.db.transaction().execute(async (trx) => {
      const inserted = await trx
        .insertInto('gateways')
        .values({
          id: body.id,
          site_id: site.id,
          name: body.name,
          secret_hash: hashGatewaySecret(secret),
        })
        .onConflict((oc) => oc.column('id').doNothing())
        .returning(COLUMNS)
        .executeTakeFirst();
      if (!inserted)
        throw conflict('gateway_id_taken', `The gateway id ${body.id} is already registered`);
      await this.audit.record(
        {
          companyId: user.companyId,
          userId: user.id,
          action: 'gateway_created',
          targetType: 'gateway',
          targetId: body.id,
          details: { siteId: site.id },
        },
        trx,
      );
      await notifyGateway(trx, site.id);
      return inserted;
    });
    return withSecret(row, secret);
  }

  async rotate(user: SessionUser, site: VisibleSite, gatewayId: string) {
    const secret = newGatewaySecret();
    const row = await this.db.transaction().execute(async (trx) => {
      const updated = await trx
        .updateTable('gateways')
        .set({ secret_hash: hashGatewaySecret(secret), rotated_at: new Date() })
        .where('id', '=', gatewayId)
        .where('site_id', '=', site.id)
        .where('revoked_at', 'is', null)
        .returning(COLUMNS)
        .executeTakeFirst();
      if (!updated) throw notFound('Active gateway');
      await this.audit.record(
        {
          companyId: user.companyId,
          userId: user.id,
          action: 'gateway_rotated',
          targetType: 'gateway',
          targetId: gatewayId,
          details: { siteId: site.id },
        },
        trx,
      );
      await notifyGateway(trx, site.id);
      return updated;
    });
    return withSecret(row, secret);
  }

  async revoke(user: SessionUser, site: VisibleSite, gatewayId: string): Promise<GatewayDto> {
    const row = await this.db.transaction().execute(async (trx) => {
      const updated = await trx
        .updateTable('gateways')
        .set({ revoked_at: sql<Date>`coalesce(revoked_at, now())`, online: false })
        .where('id', '=', gatewayId)
        .where('site_id', '=', site.id)
        .returning(COLUMNS)
        .executeTakeFirst();
      if (!updated) throw notFound('Gateway');
      await this.audit.record(
        {
          companyId: user.companyId,
          userId: user.id,
          action: 'gateway_revoked',
          targetType: 'gateway',
          targetId: gatewayId,
          details: { siteId: site.id },
        },
        trx,
      );
      await notifyGateway(trx, site.id);
      return updated;
    });
    return toDto(row);
  }

  async rejects(site: VisibleSite, gatewayId: string, limit: number) {
    const gateway = await this.db
      .selectFrom('gateways')
      .select('id')
      .where('id', '=', gatewayId)
      .where('site_id', '=', site.id)
      .executeTakeFirst();
    if (!gateway) throw notFound('Gateway');
    const rows = await this.db
      .selectFrom('ingest_rejects')
      .select(['id', 'received_at', 'record_name', 'record_time', 'reason', 'raw'])
      .where('gateway_id', '=', gatewayId)
      .where('site_id', '=', site.id)
      .orderBy('received_at', 'desc')
      .limit(limit)
      .execute();
    return rows.map((r) => ({
      id: r.id,
      receivedAt: r.received_at,
      recordName: r.record_name,
      recordTime: r.record_time,
      reason: r.reason,
      raw: r.raw,
    }));
  }
}

function toDto(row: GatewayRow): GatewayDto {
  return {
    id: row.id,
    name: row.name,
    status: row.revoked_at ? 'revoked' : 'active',
    online: row.online,
    lastSeenAt: row.last_seen_at,
    createdAt: row.created_at,
    rotatedAt: row.rotated_at,
    revokedAt: row.revoked_at,
  };
}

function withSecret(row: GatewayRow, secret: string) {
  return {
    gateway: toDto(row),
    secret,
    mqtt: { username: row.id, clientId: row.id, topic: `gateways/${row.id}/senml` },
  };
}

async function notifyGateway(db: Database, siteId: string): Promise<void> {
  const payload = JSON.stringify({ siteId, what: ['gateway'], at: new Date().toISOString() });
  await sql`select pg_notify('site_updates', ${payload})`.execute(db);
}
