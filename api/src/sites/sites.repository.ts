import { Injectable } from '@nestjs/common';
import type { Database, Sites } from '@wellkept/db';
import type { Selectable } from 'kysely';
import { visibleTo } from '../access/site-access.repository.js';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { InjectDb } from '../database/database.module.js';
import type { CreateSiteBody, SiteDto, UpdateSiteBody } from './dto/site.dto.js';

@Injectable()
export class SitesRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  async listVisible(user: SessionUser): Promise<SiteDto[]> {
    const rows = await this.db
      .selectFrom('sites as s')
      .selectAll('s')
      .where('s.company_id', '=', user.companyId)
      .where((eb) => visibleTo(user, eb.ref('s.id')))
      .orderBy('s.name')
      .execute();
    return rows.map(toSiteDto);
  }

  async get(site: VisibleSite): Promise<SiteDto> {
    const row = await this.db
      .selectFrom('sites')
      .selectAll()
      .where('id', '=', site.id)
      .where('company_id', '=', site.companyId)
      .executeTakeFirstOrThrow();
    return toSiteDto(row);
  }

  async create(companyId: string, body: CreateSiteBody, db: Database = this.db): Promise<SiteDto> {
    const row = await db
      .insertInto('sites')
      .values({
        company_id: companyId,
        name: body.name,
        locality: body.locality,
        latitude: body.latitude,
        longitude: body.longitude,
        elevation_m: body.elevationM,
        time_zone: body.timeZone,
        notes: body.notes,
        reporting_interval_s: body.reportingIntervalS,
      })
      .returningAll()
      .executeTakeFirstOrThrow();
    return toSiteDto(row);
  }

  async update(site: VisibleSite, body: UpdateSiteBody, db: Database = this.db): Promise<SiteDto> {
    const row = await db
      .updateTable('sites')
      .set({
        name: body.name,
        locality: body.locality,
        latitude: body.latitude,
        longitude: body.longitude,
        elevation_m: body.elevationM,
        time_zone: body.timeZone,
        notes: body.notes,
        reporting_interval_s: body.reportingIntervalS,
        updated_at: new Date(),
      })
      .where('id', '=', site.id)
      .where('company_id', '=', site.companyId)
      .returningAll()
      .executeTakeFirstOrThrow();
    return toSiteDto(row);
  }

  async delete(site: VisibleSite, db: Database = this.db): Promise<void> {
    await db
      .deleteFrom('sites')
      .where('id', '=', site.id)
      .where('company_id', '=', site.companyId)
      .execute();
  }

  /** Which of these ids are sites of the company (for owner links and invitations). */
  async idsInCompany(companyId: string, ids: string[]): Promise<string[]> {
    if (!ids.length) return [];
    const rows = await this.db
      .selectFrom('sites')
      .select('id')
      .where('company_id', '=', companyId)
      .where('id', 'in', ids)
      .execute();
    return rows.map((r) => r.id);
  }
}

export function toSiteDto(row: Selectable<Sites>): SiteDto {
  return {
    id: row.id,
    name: row.name,
    locality: row.locality,
    latitude: row.latitude,
    longitude: row.longitude,
    elevationM: row.elevation_m,
    timeZone: row.time_zone,
    notes: row.notes,
    reportingIntervalS: row.reporting_interval_s,
    createdAt: row.created_at,
    updatedAt: row.updated_at,
  };
}
