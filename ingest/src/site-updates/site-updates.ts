import { Inject, Injectable } from '@nestjs/common';
import { EventEmitter2 } from '@nestjs/event-emitter';
import { sql, type Kysely, type RawBuilder } from 'kysely';
import type { DB } from '@wellkept/db';

/** What changed at a site (the `what` of the `site_updates` contract). */
export type SiteUpdateKind = 'readings' | 'pump_runs' | 'alerts' | 'gateway';

/** In-process event name; the rules module subscribes with `@OnEvent(SITE_UPDATED)`. */
export const SITE_UPDATED = 'site.updated';

/** PostgreSQL channel the API listens on for live updates. */
export const SITE_UPDATES_CHANNEL = 'site_updates';

/** Payload of both the in-process event and the NOTIFY (the NOTIFY carries the first three). */
export interface SiteUpdatedEvent {
  siteId: string;
  what: SiteUpdateKind[];
  /** When the change was committed, ISO 8601. */
  at: string;
  /** For readings: the span of record times that arrived, ISO 8601 (late data shows here). */
  from?: string;
  to?: string;
}

/**
 * Announces committed changes: a NOTIFY inside the committing transaction (so listeners hear
 * only of data they can read) and an in-process event after the commit.
 */
@Injectable()
export class SiteUpdates {
  constructor(@Inject(EventEmitter2) private readonly events: EventEmitter2) {}

  /** One NOTIFY per event, in one statement; call inside the transaction that writes. */
  async notifyInTransaction(trx: Kysely<DB>, updates: readonly SiteUpdatedEvent[]): Promise<void> {
    if (updates.length === 0) return;
    await sql`select ${this.notifySelect(updates)}`.execute(trx);
  }

  /**
   * The NOTIFYs of `updates` as an SQL expression (their count), for a statement that does other
   * work too: it is sent when the statement commits.
   */
  notifySelect(updates: readonly SiteUpdatedEvent[]): RawBuilder<number> {
    const payloads = updates.map((u) =>
      JSON.stringify({ siteId: u.siteId, what: u.what, at: u.at }),
    );
    return sql<number>`(select count(pg_notify(${SITE_UPDATES_CHANNEL}, p))::int from unnest(${payloads}::text[]) as p)`;
  }

  /** In-process events; call after the commit. */
  emit(updates: readonly SiteUpdatedEvent[]): void {
    for (const u of updates) this.events.emit(SITE_UPDATED, u);
  }
}
