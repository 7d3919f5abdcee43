import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import { sql } from 'kysely';
import { InjectDb } from '../database/database.module.js';

@Injectable()
export class PasswordResetsRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  async create(userId: string, tokenHash: string, ttlSeconds: number) {
    return this.db
      .insertInto('password_resets')
      .values({
        user_id: userId,
        token_hash: tokenHash,
        expires_at: sql<Date>`now() + make_interval(secs => ${ttlSeconds})`,
      })
      .returning(['id', 'expires_at'])
      .executeTakeFirstOrThrow();
  }

  async findByTokenHash(tokenHash: string) {
    return this.db
      .selectFrom('password_resets')
      .select(['id', 'user_id', 'expires_at', 'used_at'])
      .where('token_hash', '=', tokenHash)
      .executeTakeFirst();
  }

  /** Uses a reset link once; only one concurrent caller gets the row back. */
  async consume(db: Database, tokenHash: string) {
    return db
      .updateTable('password_resets')
      .set({ used_at: new Date() })
      .where('token_hash', '=', tokenHash)
      .where('used_at', 'is', null)
      .where('expires_at', '>', new Date())
      .returning(['id', 'user_id'])
      .executeTakeFirst();
  }

  /** Other open links of the user stop working once one was used. */
  async expireOthers(db: Database, userId: string): Promise<void> {
    await db
      .updateTable('password_resets')
      .set({ used_at: new Date() })
      .where('user_id', '=', userId)
      .where('used_at', 'is', null)
      .execute();
  }
}
