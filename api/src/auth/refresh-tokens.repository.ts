import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import { sql } from 'kysely';
import { InjectDb } from '../database/database.module.js';

@Injectable()
export class RefreshTokensRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  async create(userId: string, tokenHash: string, ttlSeconds: number): Promise<void> {
    await this.db
      .insertInto('refresh_tokens')
      .values({
        user_id: userId,
        token_hash: tokenHash,
        expires_at: sql<Date>`now() + make_interval(secs => ${ttlSeconds})`,
      })
      .execute();
  }

  /**
   * Marks a live token used (revoked) and returns its user; null if unknown, expired or used.
   * `reused` is set when the token existed but was already revoked: a sign that it was copied.
   */
  async consume(
    tokenHash: string,
  ): Promise<{ userId: string } | { reused: true; userId: string } | null> {
    const used = await this.db
      .updateTable('refresh_tokens')
      .set({ revoked_at: new Date() })
      .where('token_hash', '=', tokenHash)
      .where('revoked_at', 'is', null)
      .where('expires_at', '>', new Date())
      .returning('user_id')
      .executeTakeFirst();
    if (used) return { userId: used.user_id };
    const old = await this.db
      .selectFrom('refresh_tokens')
      .select(['user_id', 'revoked_at'])
      .where('token_hash', '=', tokenHash)
      .executeTakeFirst();
    return old?.revoked_at ? { reused: true, userId: old.user_id } : null;
  }

  async revoke(tokenHash: string): Promise<void> {
    await this.db
      .updateTable('refresh_tokens')
      .set({ revoked_at: new Date() })
      .where('token_hash', '=', tokenHash)
      .where('revoked_at', 'is', null)
      .execute();
  }

  /** Ends every session of a user (deactivation, password reset, token reuse). */
  async revokeAllForUser(userId: string, db: Database = this.db): Promise<void> {
    await db
      .updateTable('refresh_tokens')
      .set({ revoked_at: new Date() })
      .where('user_id', '=', userId)
      .where('revoked_at', 'is', null)
      .execute();
  }
}
