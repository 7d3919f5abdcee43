import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import { sql } from 'kysely';
import type { Role } from '../access/session-user.js';
import { InjectDb } from '../database/database.module.js';

const PUBLIC_COLUMNS = [
  'u.id',
  'u.company_id',
  'u.email',
  'u.name',
  'u.role',
  'u.active',
  'u.unit_system',
  'u.time_zone',
  'u.quiet_hours_start',
  'u.quiet_hours_end',
  'u.last_sign_in_at',
  'u.created_at',
] as const;

/** People, always within one company (the tenant). */
@Injectable()
export class UsersRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  /** An active user by id (the session check on every request). */
  async findActiveById(id: string) {
    return this.db
      .selectFrom('users as u')
      .select(PUBLIC_COLUMNS)
      .where('u.id', '=', id)
      .where('u.active', '=', true)
      .executeTakeFirst();
  }

  /** For sign-in: any company, matched case-insensitively. */
  async findForSignIn(email: string) {
    return this.db
      .selectFrom('users')
      .select(['id', 'company_id', 'role', 'active', 'password_hash'])
      .where(sql`lower(email)`, '=', email.toLowerCase())
      .executeTakeFirst();
  }

  async emailInUse(email: string): Promise<boolean> {
    const row = await this.db
      .selectFrom('users')
      .select('id')
      .where(sql`lower(email)`, '=', email.toLowerCase())
      .executeTakeFirst();
    return row !== undefined;
  }

  async findInCompany(companyId: string, id: string) {
    return this.db
      .selectFrom('users as u')
      .select(PUBLIC_COLUMNS)
      .where('u.id', '=', id)
      .where('u.company_id', '=', companyId)
      .executeTakeFirst();
  }

  async listInCompany(companyId: string) {
    return this.db
      .selectFrom('users as u')
      .select(PUBLIC_COLUMNS)
      .select((eb) =>
        eb
          .fn<string[]>('coalesce', [
            sql`(select array_agg(os.site_id order by os.site_id) from owner_sites os where os.user_id = u.id)`,
            sql`'{}'::uuid[]`,
          ])
          .as('site_ids'),
      )
      .where('u.company_id', '=', companyId)
      .orderBy('u.name')
      .execute();
  }

  async linkedSiteIds(userId: string): Promise<string[]> {
    const rows = await this.db
      .selectFrom('owner_sites')
      .select('site_id')
      .where('user_id', '=', userId)
      .orderBy('site_id')
      .execute();
    return rows.map((r) => r.site_id);
  }

  /** Replaces an owner's site links (sites must belong to the company; checked by the caller). */
  async setLinkedSites(userId: string, siteIds: string[], db: Database = this.db): Promise<void> {
    await db.deleteFrom('owner_sites').where('user_id', '=', userId).execute();
    if (siteIds.length) {
      await db
        .insertInto('owner_sites')
        .values(siteIds.map((site_id) => ({ user_id: userId, site_id })))
        .execute();
    }
  }

  async create(
    db: Database,
    values: { companyId: string; email: string; name: string; role: Role; passwordHash: string },
  ): Promise<string> {
    const row = await db
      .insertInto('users')
      .values({
        company_id: values.companyId,
        email: values.email,
        name: values.name,
        role: values.role,
        password_hash: values.passwordHash,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await db.insertInto('notification_preferences').values({ user_id: row.id }).execute();
    return row.id;
  }

  async update(
    companyId: string,
    id: string,
    values: { role?: Role; name?: string; active?: boolean },
    db: Database = this.db,
  ): Promise<boolean> {
    const r = await db
      .updateTable('users')
      .set({ ...values, updated_at: new Date() })
      .where('id', '=', id)
      .where('company_id', '=', companyId)
      .executeTakeFirst();
    return Number(r.numUpdatedRows) === 1;
  }

  async setPassword(id: string, passwordHash: string, db: Database = this.db): Promise<void> {
    await db
      .updateTable('users')
      .set({ password_hash: passwordHash, updated_at: new Date() })
      .where('id', '=', id)
      .execute();
  }

  async markSignedIn(id: string): Promise<void> {
    await this.db
      .updateTable('users')
      .set({ last_sign_in_at: new Date() })
      .where('id', '=', id)
      .execute();
  }

  async countActiveAdmins(companyId: string): Promise<number> {
    const row = await this.db
      .selectFrom('users')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('company_id', '=', companyId)
      .where('role', '=', 'admin')
      .where('active', '=', true)
      .executeTakeFirstOrThrow();
    return Number(row.n);
  }

  async companyName(companyId: string): Promise<string> {
    const row = await this.db
      .selectFrom('companies')
      .select('name')
      .where('id', '=', companyId)
      .executeTakeFirstOrThrow();
    return row.name;
  }
}
