import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import type { SessionUser } from '../access/session-user.js';
import { SiteAccessRepository } from '../access/site-access.repository.js';
import { notFound } from '../common/api-error.js';
import { InjectDb } from '../database/database.module.js';
import type { AlertKind, NotificationPreferences, UpdateAccountBody } from './dto/account.dto.js';

@Injectable()
export class AccountService {
  constructor(
    @InjectDb() private readonly db: Database,
    private readonly sites: SiteAccessRepository,
  ) {}

  async settings(user: SessionUser) {
    const row = await this.db
      .selectFrom('users')
      .select(['name', 'email', 'unit_system', 'time_zone', 'quiet_hours_start', 'quiet_hours_end'])
      .where('id', '=', user.id)
      .where('company_id', '=', user.companyId)
      .executeTakeFirstOrThrow();
    return {
      name: row.name,
      email: row.email,
      unitSystem: row.unit_system,
      timeZone: row.time_zone,
      quietHours:
        row.quiet_hours_start && row.quiet_hours_end
          ? { start: row.quiet_hours_start.slice(0, 5), end: row.quiet_hours_end.slice(0, 5) }
          : null,
    };
  }

  async update(user: SessionUser, body: UpdateAccountBody) {
    await this.db
      .updateTable('users')
      .set({
        name: body.name,
        unit_system: body.unitSystem,
        time_zone: body.timeZone,
        ...(body.quietHours !== undefined
          ? {
              quiet_hours_start: body.quietHours?.start ?? null,
              quiet_hours_end: body.quietHours?.end ?? null,
            }
          : {}),
        updated_at: new Date(),
      })
      .where('id', '=', user.id)
      .where('company_id', '=', user.companyId)
      .execute();
    return this.settings(user);
  }

  async notifications(user: SessionUser): Promise<NotificationPreferences> {
    const row = await this.db
      .selectFrom('notification_preferences')
      .select(['kinds', 'site_ids', 'on_open', 'on_clear'])
      .where('user_id', '=', user.id)
      .executeTakeFirst();
    if (!row) {
      return { kinds: [], siteIds: null, onOpen: true, onClear: true };
    }
    return {
      kinds: row.kinds as AlertKind[],
      siteIds: row.site_ids,
      onOpen: row.on_open,
      onClear: row.on_clear,
    };
  }

  async setNotifications(
    user: SessionUser,
    body: NotificationPreferences,
  ): Promise<NotificationPreferences> {
    if (body.siteIds) {
      const visible = new Set((await this.sites.listVisible(user)).map((s) => s.id));
      if (body.siteIds.some((id) => !visible.has(id))) throw notFound('Site');
    }
    const values = {
      kinds: [...new Set(body.kinds)],
      site_ids: body.siteIds ? [...new Set(body.siteIds)] : null,
      on_open: body.onOpen,
      on_clear: body.onClear,
      updated_at: new Date(),
    };
    await this.db
      .insertInto('notification_preferences')
      .values({ user_id: user.id, ...values })
      .onConflict((oc) => oc.column('user_id').doUpdateSet(values))
      .execute();
    return this.notifications(user);
  }
}
