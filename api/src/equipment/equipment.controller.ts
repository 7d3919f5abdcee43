import { Body, Controller, Delete, Get, Param, Patch, Post, Put } from '@nestjs/common';
import { ApiBody, ApiTags } from '@nestjs/swagger';
import { z } from 'zod';
import {
  ANY_ROLE,
  CurrentSite,
  CurrentUser,
  SiteAccess,
  STAFF,
} from '../access/access.decorators.js';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { Endpoint, openApiSchema } from '../common/endpoint.decorator.js';
import { siteParams } from '../common/schemas.js';
import {
  batteryBankBody,
  collectionParams,
  equipmentResponse,
  floatSwitchBody,
  itemParams,
  noteParams,
  notesBody,
  pumpBody,
  pvArrayBody,
  tankBody,
  wellBody,
} from './dto/equipment.dto.js';
import { EquipmentService } from './equipment.service.js';

const anyItem = z.record(z.string(), z.unknown());
const collectionBody = z.union([pumpBody, tankBody, pvArrayBody, floatSwitchBody]);

@ApiTags('equipment')
@Controller('sites/:siteId/equipment')
export class EquipmentController {
  constructor(private readonly equipment: EquipmentService) {}

  @Get()
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: "A site's battery bank, well, pumps, tanks, PV arrays and float switches",
    params: siteParams,
    response: equipmentResponse,
  })
  all(@CurrentSite() site: VisibleSite) {
    return this.equipment.all(site);
  }

  @Put('battery-bank')
  @SiteAccess(['admin'])
  @Endpoint({
    summary: 'Set the battery bank (one per site)',
    params: siteParams,
    body: batteryBankBody,
    response: anyItem,
  })
  putBattery(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Body() body: unknown,
  ) {
    return this.equipment.putBatteryBank(user, site, body);
  }

  @Delete('battery-bank')
  @SiteAccess(['admin'])
  @Endpoint({ summary: 'Remove the battery bank', params: siteParams, status: 204 })
  async deleteBattery(@CurrentUser() user: SessionUser, @CurrentSite() site: VisibleSite) {
    await this.equipment.deleteSingleton(user, site, 'battery-bank');
  }

  @Put('well')
  @SiteAccess(['admin'])
  @Endpoint({
    summary: 'Set the well (one per site)',
    params: siteParams,
    body: wellBody,
    response: anyItem,
  })
  putWell(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Body() body: unknown,
  ) {
    return this.equipment.putWell(user, site, body);
  }

  @Delete('well')
  @SiteAccess(['admin'])
  @Endpoint({ summary: 'Remove the well', params: siteParams, status: 204 })
  async deleteWell(@CurrentUser() user: SessionUser, @CurrentSite() site: VisibleSite) {
    await this.equipment.deleteSingleton(user, site, 'well');
  }

  @Post(':kind')
  @SiteAccess(['admin'])
  @ApiBody({ schema: openApiSchema(collectionBody) })
  @Endpoint({
    summary:
      'Add a pump, tank, PV array or float switch (kind: pumps, tanks, pv-arrays, float-switches)',
    description: 'The body follows the kind (one of the schemas shown); errors name the field.',
    params: collectionParams,
    response: anyItem,
    status: 201,
  })
  create(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Param() params: z.infer<typeof collectionParams>,
    @Body() body: unknown,
  ) {
    return this.equipment.create(user, site, params.kind, body);
  }

  @Patch(':kind/:itemId')
  @SiteAccess(['admin'])
  @Endpoint({
    summary: 'Change a pump, tank, PV array or float switch',
    params: itemParams,
    response: anyItem,
  })
  update(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Param() params: z.infer<typeof itemParams>,
    @Body() body: unknown,
  ) {
    return this.equipment.update(user, site, params.kind, params.itemId, body);
  }

  @Delete(':kind/:itemId')
  @SiteAccess(['admin'])
  @Endpoint({
    summary: 'Remove a pump, tank, PV array or float switch',
    params: itemParams,
    status: 204,
  })
  async delete(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Param() params: z.infer<typeof itemParams>,
  ) {
    await this.equipment.delete(user, site, params.kind, params.itemId);
  }

  @Put(':kind/:itemId/notes')
  @SiteAccess(STAFF)
  @Endpoint({
    summary: "Write a piece of equipment's notes (technicians too)",
    params: noteParams,
    body: notesBody,
    response: anyItem,
  })
  notes(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Param() params: z.infer<typeof noteParams>,
    @Body() body: z.infer<typeof notesBody>,
  ) {
    return this.equipment.setNotes(user, site, params.kind, params.itemId, body.notes);
  }
}
