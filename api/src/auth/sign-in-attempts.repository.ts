import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import { sql } from 'kysely';
import { InjectDb } from '../database/database.module.js';

@Injectable()
export class SignInAttemptsRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  async record(email: string, ip: string, succeeded: boolean): Promise<void> {
    await this.db
      .insertInto('sign_in_attempts')
      .values({ email: email.toLowerCase(), ip, succeeded })
      .execute();
  }

  /**
   * Times of failed attempts for an account inside the window since its last success, newest
   * first (a successful sign-in clears the account's count).
   */
  async recentAccountFailures(
    email: string,
    windowSeconds: number,
    limit: number,
  ): Promise<Date[]> {
    const rows = await this.db
      .selectFrom('sign_in_attempts')
      .select('at')
      .where(sql`lower(email)`, '=', email.toLowerCase())
      .where('succeeded', '=', false)
      .where('at', '>', sql<Date>`now() - make_interval(secs => ${windowSeconds})`)
      .where(
        'at',
        '>',
        sql<Date>`coalesce((select max(s.at) from sign_in_attempts s
          where lower(s.email) = ${email.toLowerCase()} and s.succeeded), '-infinity')`,
      )
      .orderBy('at', 'desc')
      .limit(limit)
      .execute();
    return rows.map((r) => r.at);
  }

  /** Times of failed attempts from one address inside the window, newest first. */
  async recentAddressFailures(ip: string, windowSeconds: number, limit: number): Promise<Date[]> {
    const rows = await this.db
      .selectFrom('sign_in_attempts')
      .select('at')
      .where('ip', '=', ip)
      .where('succeeded', '=', false)
      .where('at', '>', sql<Date>`now() - make_interval(secs => ${windowSeconds})`)
      .orderBy('at', 'desc')
      .limit(limit)
      .execute();
    return rows.map((r) => r.at);
  }
}
