import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import type { Kysely } from 'kysely';
import type { VisibleSite } from '../access/session-user.js';
import { InjectDb } from '../database/database.module.js';

export type EquipmentTable =
  'pumps' | 'tanks' | 'pv_arrays' | 'float_switches' | 'battery_banks' | 'wells';
type Row = Record<string, unknown>;

/**
 * Equipment rows of one site. The tables share a shape (id, site_id, notes, timestamps), so
 * one repository serves them all; every statement is bound to the checked site.
 */
@Injectable()
export class EquipmentRepository {
  // The table name is a parameter here, which Kysely's static types cannot follow.
  private readonly dyn: Kysely<Record<EquipmentTable, Row>>;

  constructor(@InjectDb() db: Database) {
    this.dyn = db as unknown as Kysely<Record<EquipmentTable, Row>>;
  }

  async list(site: VisibleSite, table: EquipmentTable): Promise<Row[]> {
    return this.dyn
      .selectFrom(table)
      .selectAll()
      .where('site_id', '=', site.id)
      .orderBy(table === 'battery_banks' || table === 'wells' ? 'created_at' : 'key')
      .execute();
  }

  async insert(site: VisibleSite, table: EquipmentTable, values: Row): Promise<Row> {
    return this.dyn
      .insertInto(table)
      .values({ ...values, site_id: site.id })
      .returningAll()
      .executeTakeFirstOrThrow();
  }

  async update(
    site: VisibleSite,
    table: EquipmentTable,
    id: string,
    values: Row,
  ): Promise<Row | undefined> {
    return this.dyn
      .updateTable(table)
      .set({ ...values, updated_at: new Date() })
      .where('id', '=', id)
      .where('site_id', '=', site.id)
      .returningAll()
      .executeTakeFirst();
  }

  async delete(site: VisibleSite, table: EquipmentTable, id: string): Promise<boolean> {
    const r = await this.dyn
      .deleteFrom(table)
      .where('id', '=', id)
      .where('site_id', '=', site.id)
      .executeTakeFirst();
    return Number(r.numDeletedRows) === 1;
  }

  /** The one battery bank or well of a site, created or replaced. */
  async upsertSingleton(
    site: VisibleSite,
    table: 'battery_banks' | 'wells',
    values: Row,
  ): Promise<Row> {
    return this.dyn
      .insertInto(table)
      .values({ ...values, site_id: site.id })
      .onConflict((oc) => oc.column('site_id').doUpdateSet({ ...values, updated_at: new Date() }))
      .returningAll()
      .executeTakeFirstOrThrow();
  }

  async deleteSingleton(site: VisibleSite, table: 'battery_banks' | 'wells'): Promise<boolean> {
    const r = await this.dyn.deleteFrom(table).where('site_id', '=', site.id).executeTakeFirst();
    return Number(r.numDeletedRows) === 1;
  }

  /** Which of these ids are rows of the table at this site. */
  async idsAtSite(site: VisibleSite, table: EquipmentTable, ids: string[]): Promise<Set<string>> {
    if (!ids.length) return new Set();
    const rows = await this.dyn
      .selectFrom(table)
      .select('id')
      .where('site_id', '=', site.id)
      .where('id', 'in', ids)
      .execute();
    return new Set(rows.map((r) => String(r.id)));
  }
}
