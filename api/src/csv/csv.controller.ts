import { Controller, Get, Post, Query, Req, Res } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import type { FastifyReply, FastifyRequest } from 'fastify';
import type { z } from 'zod';
import { ANY_ROLE, CurrentSite, SiteAccess, STAFF } from '../access/access.decorators.js';
import type { VisibleSite } from '../access/session-user.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import { siteParams } from '../common/schemas.js';
import { CsvService } from './csv.service.js';
import {
  type ExportReadingsQuery,
  exportPumpRunsQuery,
  exportReadingsQuery,
  importPreview,
  importResult,
} from './dto/csv.dto.js';

const IMPORT_HELP =
  'multipart/form-data with "file" (the CSV, header on line 1), "mapping" (JSON: timeColumn, timeFormat, ' +
  'columns: [{ column, measurement, scale }]) and, to commit, "acceptGoodRows" ("true" keeps the good rows of a file with bad rows).';

@ApiTags('csv')
@Controller('sites/:siteId')
export class CsvController {
  constructor(private readonly csv: CsvService) {}

  @Get('readings.csv')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: 'Raw readings as CSV (streamed; one row per instant, one column per channel)',
    params: siteParams,
    query: exportReadingsQuery,
    produces: 'text/csv',
  })
  async readings(
    @CurrentSite() site: VisibleSite,
    @Query() query: ExportReadingsQuery,
    @Res() reply: FastifyReply,
  ) {
    const stream = await this.csv.exportReadings(site, query);
    return sendCsv(
      reply,
      stream,
      `readings-${query.from.toISOString().slice(0, 10)}-${query.to.toISOString().slice(0, 10)}.csv`,
    );
  }

  @Get('pump-runs.csv')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: 'Pump runs as CSV (streamed)',
    params: siteParams,
    query: exportPumpRunsQuery,
    produces: 'text/csv',
  })
  async pumpRuns(
    @CurrentSite() site: VisibleSite,
    @Query() query: z.infer<typeof exportPumpRunsQuery>,
    @Res() reply: FastifyReply,
  ) {
    return sendCsv(reply, await this.csv.exportPumpRuns(site, query), 'pump-runs.csv');
  }

  @Post('imports/preview')
  @SiteAccess(STAFF)
  @Endpoint({
    summary:
      "Preview a data logger's CSV: columns, a suggested mapping, and with a mapping, per-row errors with line numbers",
    description: IMPORT_HELP,
    params: siteParams,
    multipart: true,
    response: importPreview,
  })
  preview(@CurrentSite() site: VisibleSite, @Req() request: FastifyRequest) {
    return this.csv.preview(site, request);
  }

  @Post('imports/commit')
  @SiteAccess(STAFF)
  @Endpoint({
    summary:
      'Store a CSV history through the ingest storage path (buckets and pump runs follow); 422 lists bad rows unless acceptGoodRows',
    description: IMPORT_HELP,
    params: siteParams,
    multipart: true,
    response: importResult,
  })
  commit(@CurrentSite() site: VisibleSite, @Req() request: FastifyRequest) {
    return this.csv.commit(site, request);
  }
}

function sendCsv(reply: FastifyReply, stream: NodeJS.ReadableStream, fileName: string) {
  return reply
    .header('content-type', 'text/csv; charset=utf-8')
    .header('content-disposition', `attachment; filename="${fileName}"`)
    .header('cache-control', 'no-store')
    .send(stream);
}
