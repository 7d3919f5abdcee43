import { Inject, Injectable } from '@nestjs/common';
import { sql } from 'kysely';
import { booleanArrayLiteral, textArrayLiteral } from '../database/array-literals.js';
import { DATABASE, type Database } from '../database/database.js';
import type { SiteUpdatedEvent } from '../site-updates/site-updates.js';
import { SiteUpdates } from '../site-updates/site-updates.js';

/** Gateways per last-seen UPDATE. */
const LAST_SEEN_PER_STATEMENT = 5_000;

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
        from unnest(${textArrayLiteral(changes.map((c) => c.id))}::text[],
                    ${booleanArrayLiteral(changes.map((c) => c.online))}::bool[],
                    ${textArrayLiteral(changes.map((c) => c.at.toISOString()))}::timestamptz[])
          as c(id, online, at)
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

  /**
   * Moves last-seen times forward (never back), in slices of a few thousand gateways: the
   * parameters of one statement for a whole fleet are built on the event loop that answers
   * PUBACKs (see database/array-literals.ts).
   */
  async touchLastSeen(seen: ReadonlyMap<string, number>): Promise<void> {
    const all = [...seen];
    for (let from = 0; from < all.length; from += LAST_SEEN_PER_STATEMENT) {
      const slice = all.slice(from, from + LAST_SEEN_PER_STATEMENT);
      const ids = slice.map(([id]) => id);
      const times = slice.map(([, at]) => new Date(at).toISOString());
      await sql`
        update gateways g set last_seen_at = s.at
        from unnest(${textArrayLiteral(ids)}::text[], ${textArrayLiteral(times)}::timestamptz[])
          as s(id, at)
        where g.id = s.id and (g.last_seen_at is null or g.last_seen_at < s.at)`.execute(this.db);
    }
  }
}
