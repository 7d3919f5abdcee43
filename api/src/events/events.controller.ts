import { Controller, type MessageEvent, Sse } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import { concatMap, filter, interval, map, merge, type Observable, takeUntil } from 'rxjs';
import {
  ANY_ROLE,
  Allow,
  CurrentSite,
  CurrentUser,
  SiteAccess,
} from '../access/access.decorators.js';
import { SiteAccessRepository } from '../access/site-access.repository.js';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import { siteParams } from '../common/schemas.js';
import { SiteUpdatesListener, type SiteUpdate } from './site-updates.listener.js';

/** Proxies drop idle streams; a ping every 25 s keeps them open. */
const PING_MS = 25_000;

/**
 * Server-sent events: `site-update` events ({ siteId, what, at }) as ingest commits readings
 * and pump runs and as alerts change. The fleet stream carries only sites the caller may see,
 * checked once per site per stream (so a site added later is included for staff).
 */
@ApiTags('live updates')
@Controller()
export class EventsController {
  constructor(
    private readonly listener: SiteUpdatesListener,
    private readonly sites: SiteAccessRepository,
  ) {}

  @Sse('events')
  @Allow(...ANY_ROLE)
  @Endpoint({
    summary: 'Live updates for every site the caller may see (text/event-stream)',
    produces: 'text/event-stream',
  })
  fleet(@CurrentUser() user: SessionUser): Observable<MessageEvent> {
    const decided = new Map<string, boolean>();
    const maySee = async (siteId: string): Promise<boolean> => {
      let ok = decided.get(siteId);
      if (ok === undefined) {
        ok = (await this.sites.findVisible(user, siteId)) !== null;
        decided.set(siteId, ok);
      }
      return ok;
    };
    const visible = this.listener.updates.pipe(
      concatMap(async (u) => ((await maySee(u.siteId)) ? u : null)),
      filter((u): u is SiteUpdate => u !== null),
    );
    return this.stream(visible);
  }

  @Sse('sites/:siteId/events')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: 'Live updates for one site (text/event-stream)',
    params: siteParams,
    produces: 'text/event-stream',
  })
  site(@CurrentSite() site: VisibleSite): Observable<MessageEvent> {
    return this.stream(this.listener.updates.pipe(filter((u) => u.siteId === site.id)));
  }

  private stream(updates: Observable<SiteUpdate>): Observable<MessageEvent> {
    return merge(
      updates.pipe(map((u): MessageEvent => ({ type: 'site-update', data: u }))),
      interval(PING_MS).pipe(map((): MessageEvent => ({ type: 'ping', data: '' }))),
    ).pipe(takeUntil(this.listener.closing));
  }
}
