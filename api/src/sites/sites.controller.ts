import { Body, Controller, Delete, Get, Patch, Post } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import { z } from 'zod';
import {
  ANY_ROLE,
  Allow,
  CurrentSite,
  CurrentUser,
  SiteAccess,
} from '../access/access.decorators.js';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import { siteParams } from '../common/schemas.js';
import {
  type CreateSiteBody,
  createSiteBody,
  siteSchema,
  type UpdateSiteBody,
  updateSiteBody,
} from './dto/site.dto.js';
import { SitesService } from './sites.service.js';

@ApiTags('sites')
@Controller('sites')
export class SitesController {
  constructor(private readonly sites: SitesService) {}

  @Get()
  @Allow(...ANY_ROLE)
  @Endpoint({ summary: 'Sites the caller may see, by name', response: z.array(siteSchema) })
  list(@CurrentUser() user: SessionUser) {
    return this.sites.list(user);
  }

  @Post()
  @Allow('admin')
  @Endpoint({ summary: 'Create a site', body: createSiteBody, response: siteSchema, status: 201 })
  create(@CurrentUser() user: SessionUser, @Body() body: CreateSiteBody) {
    return this.sites.create(user, body);
  }

  @Get(':siteId')
  @SiteAccess(ANY_ROLE)
  @Endpoint({ summary: 'One site', params: siteParams, response: siteSchema })
  get(@CurrentSite() site: VisibleSite) {
    return this.sites.get(site);
  }

  @Patch(':siteId')
  @SiteAccess(['admin'])
  @Endpoint({
    summary: 'Change a site',
    params: siteParams,
    body: updateSiteBody,
    response: siteSchema,
  })
  update(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Body() body: UpdateSiteBody,
  ) {
    return this.sites.update(user, site, body);
  }

  @Delete(':siteId')
  @SiteAccess(['admin'])
  @Endpoint({
    summary: 'Delete a site with its equipment, data and history',
    params: siteParams,
    status: 204,
  })
  async delete(@CurrentUser() user: SessionUser, @CurrentSite() site: VisibleSite) {
    await this.sites.delete(user, site);
  }
}
