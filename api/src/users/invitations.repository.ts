import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import { sql } from 'kysely';
import type { Role } from '../access/session-user.js';
import { InjectDb } from '../database/database.module.js';

const COLUMNS = [
  'i.id',
  'i.email',
  'i.name',
  'i.role',
  'i.site_ids',
  'i.expires_at',
  'i.used_at',
  'i.revoked_at',
  'i.created_at',
  'i.invited_by',
] as const;

type Unprefixed = (typeof COLUMNS)[number] extends `i.${infer C}` ? C : never;

@Injectable()
export class InvitationsRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  async create(values: {
    companyId: string;
    email: string;
    name: string;
    role: Role;
    siteIds: string[];
    tokenHash: string;
    invitedBy: string;
    ttlSeconds: number;
  }) {
    return this.db
      .insertInto('invitations')
      .values({
        company_id: values.companyId,
        email: values.email,
        name: values.name,
        role: values.role,
        site_ids: values.siteIds,
        token_hash: values.tokenHash,
        invited_by: values.invitedBy,
        expires_at: sql<Date>`now() + make_interval(secs => ${values.ttlSeconds})`,
      })
      .returning(COLUMNS.map((c) => c.slice(2) as Unprefixed))
      .executeTakeFirstOrThrow();
  }

  async listInCompany(companyId: string) {
    return this.db
      .selectFrom('invitations as i')
      .select(COLUMNS)
      .where('i.company_id', '=', companyId)
      .orderBy('i.created_at', 'desc')
      .limit(200)
      .execute();
  }

  async revoke(companyId: string, id: string): Promise<boolean> {
    const r = await this.db
      .updateTable('invitations')
      .set({ revoked_at: new Date() })
      .where('id', '=', id)
      .where('company_id', '=', companyId)
      .where('used_at', 'is', null)
      .where('revoked_at', 'is', null)
      .executeTakeFirst();
    return Number(r.numUpdatedRows) === 1;
  }

  /** Looks an invitation up by its token, whatever its state (the caller explains). */
  async findByTokenHash(tokenHash: string) {
    return this.db
      .selectFrom('invitations as i')
      .innerJoin('companies as c', 'c.id', 'i.company_id')
      .select([...COLUMNS, 'i.company_id', 'c.name as company_name'])
      .where('i.token_hash', '=', tokenHash)
      .executeTakeFirst();
  }

  /** Uses an invitation once: only one concurrent caller gets the row back. */
  async consume(db: Database, tokenHash: string) {
    return db
      .updateTable('invitations as i')
      .set({ used_at: new Date() })
      .where('i.token_hash', '=', tokenHash)
      .where('i.used_at', 'is', null)
      .where('i.revoked_at', 'is', null)
      .where('i.expires_at', '>', new Date())
      .returning([...COLUMNS, 'i.company_id'])
      .executeTakeFirst();
  }
}
