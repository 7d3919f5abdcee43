import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { AuditRepository } from '../audit/audit.repository.js';
import { InjectDb } from '../database/database.module.js';
import type { CreateSiteBody, SiteDto, UpdateSiteBody } from './dto/site.dto.js';
import { SitesRepository } from './sites.repository.js';

@Injectable()
export class SitesService {
  constructor(
    @InjectDb() private readonly db: Database,
    private readonly sites: SitesRepository,
    private readonly audit: AuditRepository,
  ) {}

  list(user: SessionUser): Promise<SiteDto[]> {
    return this.sites.listVisible(user);
  }

  get(site: VisibleSite): Promise<SiteDto> {
    return this.sites.get(site);
  }

  create(user: SessionUser, body: CreateSiteBody): Promise<SiteDto> {
    return this.db.transaction().execute(async (trx) => {
      const site = await this.sites.create(user.companyId, body, trx);
      await this.audit.record(
        {
          companyId: user.companyId,
          userId: user.id,
          action: 'site_created',
          targetType: 'site',
          targetId: site.id,
          details: { name: site.name },
        },
        trx,
      );
      return site;
    });
  }

  update(user: SessionUser, site: VisibleSite, body: UpdateSiteBody): Promise<SiteDto> {
    return this.db.transaction().execute(async (trx) => {
      const updated = await this.sites.update(site, body, trx);
      await this.audit.record(
        {
          companyId: user.companyId,
          userId: user.id,
          action: 'site_updated',
          targetType: 'site',
          targetId: site.id,
          details: { changed: Object.keys(body) },
        },
        trx,
      );
      return updated;
    });
  }

  delete(user: SessionUser, site: VisibleSite): Promise<void> {
    return this.db.transaction().execute(async (trx) => {
      await this.sites.delete(site, trx);
      await this.audit.record(
        {
          companyId: user.companyId,
          userId: user.id,
          action: 'site_deleted',
          targetType: 'site',
          targetId: site.id,
          details: { name: site.name },
        },
        trx,
      );
    });
  }
}
