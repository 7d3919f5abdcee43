import { Body, Controller, Get, Param, Post, Query } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import { z } from 'zod';
import { CurrentSite, CurrentUser, SiteAccess, STAFF } from '../access/access.decorators.js';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import { siteParams } from '../common/schemas.js';
import {
  createGatewayBody,
  gatewayParams,
  gatewaySchema,
  gatewayWithSecret,
  rejectSchema,
  rejectsQuery,
} from './dto/gateways.dto.js';
import { GatewaysService } from './gateways.service.js';

@ApiTags('gateways')
@Controller('sites/:siteId/gateways')
export class GatewaysController {
  constructor(private readonly gateways: GatewaysService) {}

  @Get()
  @SiteAccess(STAFF)
  @Endpoint({
    summary: "A site's gateways (never their secrets)",
    params: siteParams,
    response: z.array(gatewaySchema),
  })
  list(@CurrentSite() site: VisibleSite) {
    return this.gateways.list(site);
  }

  @Post()
  @SiteAccess(['admin'])
  @Endpoint({
    summary: 'Register a gateway; the answer carries its secret, shown this once',
    params: siteParams,
    body: createGatewayBody,
    response: gatewayWithSecret,
    status: 201,
  })
  create(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Body() body: z.infer<typeof createGatewayBody>,
  ) {
    return this.gateways.create(user, site, body);
  }

  @Post(':gatewayId/rotate')
  @SiteAccess(['admin'])
  @Endpoint({
    summary: 'Issue a new secret (the old one stops working); shown this once',
    params: gatewayParams,
    response: gatewayWithSecret,
  })
  rotate(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Param() params: z.infer<typeof gatewayParams>,
  ) {
    return this.gateways.rotate(user, site, params.gatewayId);
  }

  @Post(':gatewayId/revoke')
  @SiteAccess(['admin'])
  @Endpoint({
    summary: 'Revoke a gateway: it can no longer connect',
    params: gatewayParams,
    response: gatewaySchema,
  })
  revoke(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Param() params: z.infer<typeof gatewayParams>,
  ) {
    return this.gateways.revoke(user, site, params.gatewayId);
  }

  @Get(':gatewayId/rejects')
  @SiteAccess(STAFF)
  @Endpoint({
    summary: 'Recent records ingest refused from this gateway, with reasons',
    params: gatewayParams,
    query: rejectsQuery,
    response: z.array(rejectSchema),
  })
  rejects(
    @CurrentSite() site: VisibleSite,
    @Param() params: z.infer<typeof gatewayParams>,
    @Query() query: z.infer<typeof rejectsQuery>,
  ) {
    return this.gateways.rejects(site, params.gatewayId, query.limit);
  }
}
