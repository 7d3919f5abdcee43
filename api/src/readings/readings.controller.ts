import { Controller, Get, Query } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import { z } from 'zod';
import { ANY_ROLE, CurrentSite, SiteAccess } from '../access/access.decorators.js';
import type { VisibleSite } from '../access/session-user.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import { siteParams } from '../common/schemas.js';
import { channelSchema, type SeriesQuery, seriesQuery, seriesResponse } from './dto/series.dto.js';
import { SeriesService } from './series.service.js';

@ApiTags('readings')
@Controller('sites/:siteId')
export class ReadingsController {
  constructor(private readonly series: SeriesService) {}

  @Get('channels')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: "A site's measurement channels with their latest values",
    params: siteParams,
    response: z.array(channelSchema),
  })
  channels(@CurrentSite() site: VisibleSite) {
    return this.series.channels(site);
  }

  @Get('series')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: 'Series of up to 12 channels between two instants',
    description:
      'The server picks raw readings or minute/hour/day buckets so each series has at most 2,000 points ' +
      '(about 1,000–2,000 for long ranges) and says which in `resolution`. `channels` is a comma-separated ' +
      'list of channel names (e.g. battery/voltage,tank/main/level); from/to are ISO 8601 (default: the last 24 h).',
    params: siteParams,
    query: seriesQuery,
    response: seriesResponse,
  })
  getSeries(@CurrentSite() site: VisibleSite, @Query() query: SeriesQuery) {
    return this.series.series(site, query);
  }
}
