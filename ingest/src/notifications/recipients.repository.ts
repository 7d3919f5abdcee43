import { Injectable } from '@nestjs/common';
import type { AlertKind, UnitSystem } from '@wellkept/core';
import { sql } from 'kysely';
import type { Database } from '../database/database.js';

/** A person to tell about an alert event. */
export interface Recipient {
  userId: string;
  email: string;
  name: string;
  role: 'admin' | 'technician' | 'owner';
  unitSystem: UnitSystem;
  timeZone: string;
  quietHours: { start: string; end: string } | null;
}

/**
 * Who hears about an alert: active people of the site's company who can see the site (admins and
 * technicians: every site of their company; owners: only the sites they are linked to), filtered
 * by their notification preferences (kinds, sites, on open / on clear). People without a
 * preferences row get the defaults of `notification_preferences`: every kind, every site they
 * can see, opens and clears.
 */
@Injectable()
export class RecipientsRepository {
  async forAlertEvent(
    db: Database,
    siteId: string,
    kind: AlertKind,
    change: 'open' | 'clear',
  ): Promise<Recipient[]> {
    const wants = change === 'open' ? sql`p.on_open` : sql`p.on_clear`;
    const { rows } = await sql<{
      id: string;
      email: string;
      name: string;
      role: Recipient['role'];
      unit_system: UnitSystem;
      time_zone: string;
      quiet_hours_start: string | null;
      quiet_hours_end: string | null;
    }>`
      select u.id, u.email, u.name, u.role, u.unit_system, u.time_zone,
             u.quiet_hours_start::text as quiet_hours_start, u.quiet_hours_end::text as quiet_hours_end
      from sites s
      join users u on u.company_id = s.company_id and u.active
      left join notification_preferences p on p.user_id = u.id
      where s.id = ${siteId}
        and (u.role in ('admin', 'technician')
             or exists (select 1 from owner_sites o where o.user_id = u.id and o.site_id = s.id))
        and (p.user_id is null
             or (${kind} = any(p.kinds)
                 and (p.site_ids is null or s.id = any(p.site_ids))
                 and ${wants}))
      order by u.id`.execute(db);
    return rows.map((r) => ({
      userId: r.id,
      email: r.email,
      name: r.name,
      role: r.role,
      unitSystem: r.unit_system,
      timeZone: r.time_zone,
      quietHours:
        r.quiet_hours_start && r.quiet_hours_end
          ? { start: r.quiet_hours_start, end: r.quiet_hours_end }
          : null,
    }));
  }

  /** The same person, if they are still active and may still see the site (for held mail). */
  async stillEntitled(
    db: Database,
    userId: string,
    siteIds: readonly string[],
  ): Promise<Set<string>> {
    if (siteIds.length === 0) return new Set();
    const { rows } = await sql<{ site_id: string }>`
      select s.id as site_id
      from users u join sites s on s.company_id = u.company_id
      where u.id = ${userId} and u.active and s.id = any(${[...siteIds]}::uuid[])
        and (u.role in ('admin', 'technician')
             or exists (select 1 from owner_sites o where o.user_id = u.id and o.site_id = s.id))`.execute(
      db,
    );
    return new Set(rows.map((r) => r.site_id));
  }

  async person(db: Database, userId: string): Promise<Recipient | null> {
    const row = await db
      .selectFrom('users')
      .select([
        'id',
        'email',
        'name',
        'role',
        'unit_system',
        'time_zone',
        sql<string | null>`quiet_hours_start::text`.as('qs'),
        sql<string | null>`quiet_hours_end::text`.as('qe'),
      ])
      .where('id', '=', userId)
      .where('active', '=', true)
      .executeTakeFirst();
    if (!row) return null;
    return {
      userId: row.id,
      email: row.email,
      name: row.name,
      role: row.role,
      unitSystem: row.unit_system,
      timeZone: row.time_zone,
      quietHours: row.qs && row.qe ? { start: row.qs, end: row.qe } : null,
    };
  }
}
