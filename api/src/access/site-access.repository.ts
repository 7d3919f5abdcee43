import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import { type Expression, type SqlBool, sql } from 'kysely';
import { InjectDb } from '../database/database.module.js';
import type { SessionUser, VisibleSite } from './session-user.js';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * The one place that decides which sites a person may see: every site of their company for
 * admins and technicians, only linked sites (owner_sites) for owners.
 */
@Injectable()
export class SiteAccessRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  /** The site if the caller may see it, else null (the caller answers 404). */
  async findVisible(user: SessionUser, siteId: string): Promise<VisibleSite | null> {
    if (!UUID.test(siteId)) return null;
    const row = await this.db
      .selectFrom('sites as s')
      .select(['s.id', 's.company_id', 's.name', 's.time_zone', 's.reporting_interval_s'])
      .where('s.id', '=', siteId)
      .where('s.company_id', '=', user.companyId)
      .where((eb) => visibleTo(user, eb.ref('s.id')))
      .executeTakeFirst();
    return row ? toVisibleSite(row) : null;
  }

  /** Every site the caller may see. */
  async listVisible(user: SessionUser): Promise<VisibleSite[]> {
    const rows = await this.db
      .selectFrom('sites as s')
      .select(['s.id', 's.company_id', 's.name', 's.time_zone', 's.reporting_interval_s'])
      .where('s.company_id', '=', user.companyId)
      .where((eb) => visibleTo(user, eb.ref('s.id')))
      .orderBy('s.name')
      .execute();
    return rows.map(toVisibleSite);
  }
}

/**
 * A condition on a site id column: true when the caller may see that site. For staff it is
 * always true (the company filter does the work); for owners it requires a link.
 */
export function visibleTo(user: SessionUser, siteId: Expression<string>): Expression<SqlBool> {
  if (user.role !== 'owner') return sql<SqlBool>`true`;
  return sql<SqlBool>`exists (select 1 from owner_sites os where os.site_id = ${siteId} and os.user_id = ${user.id})`;
}

export function toVisibleSite(row: {
  id: string;
  company_id: string;
  name: string;
  time_zone: string;
  reporting_interval_s: number;
}): VisibleSite {
  return {
    id: row.id,
    companyId: row.company_id,
    name: row.name,
    timeZone: row.time_zone,
    reportingIntervalS: row.reporting_interval_s,
  } as VisibleSite;
}
