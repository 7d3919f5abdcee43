import { z } from 'zod';
import { isoDateTime } from '../../common/schemas.js';

const channelList = z
  .string()
  .transform((s) =>
    s
      .split(',')
      .map((c) => c.trim())
      .filter(Boolean),
  )
  .pipe(
    z
      .array(z.string().min(1).max(128))
      .min(1, 'name at least one channel')
      .max(12, 'at most 12 channels per request'),
  );

/** from/to default to the last 24 hours; from must be before to. */
export const rangeQuery = z
  .object({
    from: isoDateTime().optional(),
    to: isoDateTime().optional(),
  })
  .transform(({ from, to }, ctx) => {
    const end = to ?? new Date();
    const start = from ?? new Date(end.getTime() - 24 * 3600 * 1000);
    if (start.getTime() >= end.getTime()) {
      ctx.addIssue({ code: 'custom', path: ['from'], message: 'must be before to' });
      return z.NEVER;
    }
    if (end.getTime() - start.getTime() > 20 * 366 * 86400 * 1000) {
      ctx.addIssue({
        code: 'custom',
        path: ['from'],
        message: 'the range may span at most 20 years',
      });
      return z.NEVER;
    }
    return { from: start, to: end };
  });

export const seriesQuery = z
  .object({
    channels: channelList,
    from: z.string().optional(),
    to: z.string().optional(),
  })
  .transform((q, ctx) => {
    const range = rangeQuery.safeParse({ from: q.from, to: q.to });
    if (!range.success) {
      for (const issue of range.error.issues) ctx.addIssue({ ...issue, code: 'custom' });
      return z.NEVER;
    }
    return { channels: q.channels, ...range.data };
  });
export type SeriesQuery = z.infer<typeof seriesQuery>;

export const seriesResponse = z.object({
  siteId: z.string(),
  from: z.date(),
  to: z.date(),
  resolution: z.object({
    source: z.enum(['raw', 'minute', 'ten_minute', 'hour', 'six_hour', 'day']),
    stepSeconds: z.number(),
    label: z.string(),
  }),
  /** Database rows read to answer (bounded whatever the range). */
  rowsRead: z.number(),
  series: z.array(
    z.object({
      channel: z.string(),
      unit: z.string(),
      valueKind: z.enum(['number', 'boolean']),
      /** Point start times, milliseconds since the epoch (UTC). */
      t: z.array(z.number()),
      /** Mean per point (for switches: the fraction of time on). */
      mean: z.array(z.number()),
      min: z.array(z.number()),
      max: z.array(z.number()),
    }),
  ),
});
export type SeriesResponse = z.infer<typeof seriesResponse>;

export const channelSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  unit: z.string(),
  valueKind: z.enum(['number', 'boolean', 'string']),
  lastTime: z.date().nullable(),
  lastValue: z.number().nullable(),
  lastText: z.string().nullable(),
});
