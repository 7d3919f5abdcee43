import { Inject, Injectable } from '@nestjs/common';
import { sql } from 'kysely';
import { DATABASE, type Database } from '../database/database.js';
import type { SiteUpdatedEvent } from '../site-updates/site-updates.js';
import { SiteUpdates } from '../site-updates/site-updates.js';

export interface GatewayCredentials {
  id: string;
  siteId: string;
  secretHash: string;
  revoked: boolean;
  batteryNominalVolts: number | null;
}

/** Gateways as ingest sees them: credentials to check, last-seen and online state to record. */
@Injectable()
export class GatewaysRepository {
  constructor(
    @Inject(DATABASE) private readonly db: Database,
    private readonly siteUpdates: SiteUpdates,
  ) {}

  async findCredentials(id: string): Promise<GatewayCredentials | null> {
    const row = await this.db
      .selectFrom('gateways as g')
      .leftJoin('battery_banks as b', 'b.site_id', 'g.site_id')
      .select(['g.id', 'g.site_id', 'g.secret_hash', 'g.revoked_at', 'b.nominal_voltage_v'])
      .where('g.id', '=', id)
      .executeTakeFirst();
    if (!row) return null;
    return {
      id: row.id,
      siteId: row.site_id,
      secretHash: row.secret_hash,
      revoked: row.revoked_at !== null,
      batteryNominalVolts: row.nominal_voltage_v,
    };
  }

  /** Records online/offline changes and announces them (NOTIFY with what: ["gateway"]). */
  async setOnline(
    changes: readonly { id: string; siteId: string; online: boolean; at: Date }[],
  ): Promise<SiteUpdatedEvent[]> {
    if (changes.length === 0) return [];
    return this.db.transaction().execute(async (trx) => {
      await sql`
        update gateways g set online = c.online, status_changed_at = c.at,
          last_seen_at = greatest(g.last_seen_at, c.at)
        from unnest(${changes.map((c) => c.id)}::text[], ${changes.map((c) => c.online)}::bool[],
                    ${changes.map((c) => c.at.toISOString())}::timestamptz[]) as c(id, online, at)
        where g.id = c.id and g.online is distinct from c.online`.execute(trx);
      const at = new Date().toISOString();
      const sites = [...new Set(changes.map((c) => c.siteId))];
      const updates: SiteUpdatedEvent[] = sites.map((siteId) => ({
        siteId,
        what: ['gateway'],
        at,
      }));
      await this.siteUpdates.notifyInTransaction(trx, updates);
      return updates;
    });
  }

  /** Moves last-seen times forward (never back). */
  async touchLastSeen(seen: ReadonlyMap<string, number>): Promise<void> {
    if (seen.size === 0) return;
    const ids = [...seen.keys()];
    const times = ids.map((id) => new Date(seen.get(id)!).toISOString());
    await sql`
      update gateways g set last_seen_at = s.at
      from unnest(${ids}::text[], ${times}::timestamptz[]) as s(id, at)
      where g.id = s.id and (g.last_seen_at is null or g.last_seen_at < s.at)`.execute(this.db);
  }
}
