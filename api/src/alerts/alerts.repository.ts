import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import { sql } from 'kysely';
import { visibleTo } from '../access/site-access.repository.js';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { InjectDb } from '../database/database.module.js';
import type { AlertsQuery } from './dto/alerts.dto.js';

@Injectable()
export class AlertsRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  /** Alerts of the sites the caller may see (or of one checked site). */
  async list(user: SessionUser, query: AlertsQuery, site?: VisibleSite) {
    return this.db
      .selectFrom('alerts as a')
      .innerJoin('sites as s', 's.id', 'a.site_id')
      .leftJoin('users as u', 'u.id', 'a.acknowledged_by')
      .selectAll('a')
      .select(['s.name as site_name', 'u.name as acknowledged_by_name'])
      .where('s.company_id', '=', user.companyId)
      .where((eb) => visibleTo(user, eb.ref('s.id')))
      .$if(site !== undefined, (qb) => qb.where('a.site_id', '=', site!.id))
      .$if(query.siteId !== undefined, (qb) => qb.where('a.site_id', '=', query.siteId!))
      .$if(query.kind !== undefined, (qb) => qb.where('a.kind', '=', query.kind!))
      .$if(query.status === 'active', (qb) => qb.where('a.status', '<>', 'cleared'))
      .$if(['open', 'acknowledged', 'cleared'].includes(query.status), (qb) =>
        qb.where('a.status', '=', query.status as 'open'),
      )
      .$if(query.from !== undefined, (qb) => qb.where('a.opened_at', '>=', query.from!))
      .$if(query.to !== undefined, (qb) => qb.where('a.opened_at', '<', query.to!))
      .$if(query.before !== undefined, (qb) => qb.where('a.opened_at', '<', query.before!))
      .orderBy('a.opened_at', 'desc')
      .limit(query.limit)
      .execute();
  }

  async find(site: VisibleSite, alertId: string) {
    return this.db
      .selectFrom('alerts as a')
      .innerJoin('sites as s', 's.id', 'a.site_id')
      .leftJoin('users as u', 'u.id', 'a.acknowledged_by')
      .selectAll('a')
      .select(['s.name as site_name', 'u.name as acknowledged_by_name'])
      .where('a.id', '=', alertId)
      .where('a.site_id', '=', site.id)
      .executeTakeFirst();
  }

  async events(site: VisibleSite, alertId: string) {
    return this.db
      .selectFrom('alert_events as e')
      .leftJoin('users as u', 'u.id', 'e.user_id')
      .select(['e.id', 'e.event', 'e.at', 'e.note', 'u.name as user_name'])
      .where('e.alert_id', '=', alertId)
      .where('e.site_id', '=', site.id)
      .orderBy('e.at')
      .orderBy('e.id')
      .execute();
  }

  /** Acknowledges an open alert with a note, records the event and notifies listeners. */
  async acknowledge(
    site: VisibleSite,
    alertId: string,
    userId: string,
    note: string,
  ): Promise<'done' | 'missing' | 'not_open'> {
    return this.db.transaction().execute(async (trx) => {
      const current = await trx
        .selectFrom('alerts')
        .select('status')
        .where('id', '=', alertId)
        .where('site_id', '=', site.id)
        .forUpdate()
        .executeTakeFirst();
      if (!current) return 'missing';
      if (current.status !== 'open') return 'not_open';
      const now = new Date();
      await trx
        .updateTable('alerts')
        .set({
          status: 'acknowledged',
          acknowledged_at: now,
          acknowledged_by: userId,
          acknowledge_note: note || null,
          updated_at: now,
        })
        .where('id', '=', alertId)
        .execute();
      await trx
        .insertInto('alert_events')
        .values({
          alert_id: alertId,
          site_id: site.id,
          event: 'acknowledged',
          at: now,
          user_id: userId,
          note: note || null,
        })
        .execute();
      const payload = JSON.stringify({ siteId: site.id, what: ['alerts'], at: now.toISOString() });
      await sql`select pg_notify('site_updates', ${payload})`.execute(trx);
      return 'done';
    });
  }
}
