import { Body, Controller, Get, Param, Post, Put, Query } from '@nestjs/common';
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
  acknowledgeBody,
  alertEventSchema,
  alertParams,
  alertSchema,
  alertSettingParams,
  alertSettingSchema,
  type AlertsQuery,
  alertsQuery,
  putAlertSettingBody,
} from './dto/alerts.dto.js';
import { AlertsService } from './alerts.service.js';

const alertWithHistory = alertSchema.extend({ history: z.array(alertEventSchema) });

@ApiTags('alerts')
@Controller()
export class AlertsController {
  constructor(private readonly alerts: AlertsService) {}

  @Get('alerts')
  @Allow(...ANY_ROLE)
  @Endpoint({
    summary:
      'Alerts across the sites the caller may see (default: open and acknowledged), newest first',
    query: alertsQuery,
    response: z.array(alertSchema),
  })
  fleetAlerts(@CurrentUser() user: SessionUser, @Query() query: AlertsQuery) {
    return this.alerts.list(user, query);
  }

  @Get('sites/:siteId/alerts')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: "A site's alerts",
    params: siteParams,
    query: alertsQuery,
    response: z.array(alertSchema),
  })
  siteAlerts(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Query() query: AlertsQuery,
  ) {
    return this.alerts.list(user, query, site);
  }

  @Get('sites/:siteId/alerts/:alertId')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: 'One alert with its history',
    params: alertParams,
    response: alertWithHistory,
  })
  get(@CurrentSite() site: VisibleSite, @Param() params: z.infer<typeof alertParams>) {
    return this.alerts.get(site, params.alertId);
  }

  @Post('sites/:siteId/alerts/:alertId/acknowledge')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: 'Acknowledge an open alert with a note (owners: their own sites)',
    params: alertParams,
    body: acknowledgeBody,
    response: alertWithHistory,
  })
  acknowledge(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Param() params: z.infer<typeof alertParams>,
    @Body() body: z.infer<typeof acknowledgeBody>,
  ) {
    return this.alerts.acknowledge(user, site, params.alertId, body.note);
  }

  @Get('sites/:siteId/alert-settings')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: "A site's alert thresholds, with the defaults shown",
    params: siteParams,
    response: z.array(alertSettingSchema),
  })
  settings(@CurrentSite() site: VisibleSite) {
    return this.alerts.settings(site);
  }

  @Put('sites/:siteId/alert-settings/:kind')
  @SiteAccess(['admin'])
  @Endpoint({
    summary: 'Switch an alert on or off and set its thresholds',
    params: alertSettingParams,
    body: putAlertSettingBody,
    response: alertSettingSchema,
  })
  putSetting(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Param() params: z.infer<typeof alertSettingParams>,
    @Body() body: z.infer<typeof putAlertSettingBody>,
  ) {
    return this.alerts.putSetting(user, site, params.kind, body);
  }
}
