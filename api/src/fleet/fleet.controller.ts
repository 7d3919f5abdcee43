import { Controller, Get, Query } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import { ANY_ROLE, Allow, CurrentUser } from '../access/access.decorators.js';
import type { SessionUser } from '../access/session-user.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import { type FleetQuery, fleetQuery, fleetResponse } from './dto/fleet.dto.js';
import { FleetService } from './fleet.service.js';

@ApiTags('fleet')
@Controller('fleet')
export class FleetController {
  constructor(private readonly fleet: FleetService) {}

  @Get()
  @Allow(...ANY_ROLE)
  @Endpoint({
    summary:
      'Every site the caller may see, worst first, with health, charge, water and a 24-hour mini-series',
    description:
      'Pages through the fleet worst first; `counts` and `page.total` cover every visible site. ' +
      'Details (charge, water, mini-series) are computed for the page only, so a page costs the same whatever the fleet size.',
    query: fleetQuery,
    response: fleetResponse,
  })
  overview(@CurrentUser() user: SessionUser, @Query() query: FleetQuery) {
    return this.fleet.overview(user, query);
  }
}
