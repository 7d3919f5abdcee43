import { z } from 'zod';
import { isoDateTime, uuid } from '../../common/schemas.js';

export const pumpRunsQuery = z.object({
  pumpId: uuid().optional(),
  from: isoDateTime().optional(),
  to: isoDateTime().optional(),
  limit: z.coerce.number().int().min(1).max(1000).default(200),
  /** Page: runs that started before this instant (use `nextBefore`). */
  before: isoDateTime().optional(),
});
export type PumpRunsQuery = z.infer<typeof pumpRunsQuery>;

export const pumpRunSchema = z.object({
  id: z.number(),
  pumpId: uuid(),
  pumpKey: z.string(),
  pumpName: z.string(),
  startedAt: z.date(),
  endedAt: z.date().nullable(),
  durationS: z.number().nullable(),
  energyWh: z.number().nullable(),
  meanCurrentA: z.number().nullable(),
  waterM3: z.number().nullable(),
  waterSource: z.enum(['tank_rise', 'flow']).nullable(),
  spansGap: z.boolean(),
});

export const pumpRunsResponse = z.object({
  runs: z.array(pumpRunSchema),
  /** Totals over the whole filter (every page), not only this page. */
  totals: z.object({
    runs: z.number(),
    runSeconds: z.number(),
    energyWh: z.number(),
    waterM3: z.number(),
  }),
  /** Pass as `before` for the next page; null on the last page. */
  nextBefore: z.date().nullable(),
});
