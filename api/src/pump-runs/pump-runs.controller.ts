import { Controller, Get, Query } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import { ANY_ROLE, CurrentSite, SiteAccess } from '../access/access.decorators.js';
import type { VisibleSite } from '../access/session-user.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import { siteParams } from '../common/schemas.js';
import { type PumpRunsQuery, pumpRunsQuery, pumpRunsResponse } from './dto/pump-runs.dto.js';
import { PumpRunsRepository } from './pump-runs.repository.js';

@ApiTags('pump runs')
@Controller('sites/:siteId/pump-runs')
export class PumpRunsController {
  constructor(private readonly runs: PumpRunsRepository) {}

  @Get()
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: 'Pump runs, newest first, filtered by pump and start time, with totals',
    params: siteParams,
    query: pumpRunsQuery,
    response: pumpRunsResponse,
  })
  async list(@CurrentSite() site: VisibleSite, @Query() query: PumpRunsQuery) {
    const filter = { pumpId: query.pumpId, from: query.from, to: query.to };
    const [rows, totals] = await Promise.all([
      this.runs.page(site, filter, query.limit + 1, query.before),
      this.runs.totals(site, filter),
    ]);
    const page = rows.slice(0, query.limit);
    return {
      runs: page.map((r) => ({
        id: r.id,
        pumpId: r.pump_id,
        pumpKey: r.pump_key,
        pumpName: r.pump_name,
        startedAt: r.started_at,
        endedAt: r.ended_at,
        durationS: r.duration_s,
        energyWh: r.energy_wh,
        meanCurrentA: r.mean_current_a,
        waterM3: r.water_m3,
        waterSource: r.water_source,
        spansGap: r.spans_gap,
      })),
      totals: {
        runs: Number(totals.runs),
        runSeconds: Number(totals.run_seconds),
        energyWh: Number(totals.energy_wh),
        waterM3: Number(totals.water_m3),
      },
      nextBefore: rows.length > query.limit ? page[page.length - 1]!.started_at : null,
    };
  }
}
