import { Injectable } from '@nestjs/common';
import type { Database, Json } from '@wellkept/db';
import { InjectDb } from '../database/database.module.js';

/** What the audit log records (sign-ins, role changes, configuration changes). */
export interface AuditEntry {
  companyId: string | null;
  userId: string | null;
  action: string;
  targetType?: string;
  targetId?: string;
  details?: Record<string, unknown>;
  ip?: string | null;
}

@Injectable()
export class AuditRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  /** Appends one entry; pass a transaction to record it atomically with the change. */
  async record(entry: AuditEntry, db: Database = this.db): Promise<void> {
    await db
      .insertInto('audit_log')
      .values({
        company_id: entry.companyId,
        user_id: entry.userId,
        action: entry.action,
        target_type: entry.targetType ?? null,
        target_id: entry.targetId ?? null,
        details: JSON.stringify(entry.details ?? {}) as unknown as Json,
        ip: entry.ip ?? null,
      })
      .execute();
  }

  /** A company's entries, newest first, paged by id. */
  async list(companyId: string, options: { before?: number; limit: number }) {
    return this.db
      .selectFrom('audit_log as a')
      .leftJoin('users as u', 'u.id', 'a.user_id')
      .select([
        'a.id',
        'a.at',
        'a.action',
        'a.target_type',
        'a.target_id',
        'a.details',
        'a.ip',
        'a.user_id',
        'u.name as user_name',
      ])
      .where('a.company_id', '=', companyId)
      .$if(options.before !== undefined, (qb) => qb.where('a.id', '<', options.before!))
      .orderBy('a.id', 'desc')
      .limit(options.limit)
      .execute();
  }
}
