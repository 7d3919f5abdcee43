import { z } from 'zod';
import { isoDateTime } from '../../common/schemas.js';

export const exportReadingsQuery = z.object({
  /** Comma-separated channel names; all channels when omitted. */
  channels: z
    .string()
    .transform((s) =>
      s
        .split(',')
        .map((c) => c.trim())
        .filter(Boolean),
    )
    .optional(),
  from: isoDateTime(),
  to: isoDateTime(),
});
export type ExportReadingsQuery = z.infer<typeof exportReadingsQuery>;

export const exportPumpRunsQuery = z.object({
  pumpId: z.guid().optional(),
  from: isoDateTime().optional(),
  to: isoDateTime().optional(),
});

/** How a logger's CSV maps onto Wellkept measurements (sent as the multipart field "mapping"). */
export const importMapping = z.object({
  timeColumn: z.string().min(1),
  /**
   * iso: ISO 8601 with offset or Z; epoch_seconds / epoch_milliseconds; local: 'YYYY-MM-DD HH:MM[:SS]'
   * (or with 'T') on the site's wall clock.
   */
  timeFormat: z.enum(['iso', 'epoch_seconds', 'epoch_milliseconds', 'local']).default('iso'),
  columns: z
    .array(
      z.object({
        column: z.string().min(1),
        /** A measurement name of the telemetry contract, e.g. battery/voltage or tank/main/level. */
        measurement: z.string().min(1),
        /** Multiplier to SI (e.g. 0.3048 for a level logged in feet). Default 1. */
        scale: z.number().finite().positive().default(1),
      }),
    )
    .min(1, 'map at least one column to a measurement'),
});
export type ImportMapping = z.infer<typeof importMapping>;

export const rowProblem = z.object({
  line: z.number(),
  column: z.string().nullable(),
  message: z.string(),
});
export type RowProblem = z.infer<typeof rowProblem>;

export const importPreview = z.object({
  columns: z.array(z.string()),
  /** A mapping guessed from the header (columns named like measurements, a time-like column). */
  suggestedMapping: importMapping.partial().nullable(),
  /** The mapping the preview used (null until one is sent). */
  mapping: importMapping.nullable(),
  dataRows: z.number(),
  goodRows: z.number(),
  badRows: z.number(),
  readings: z.number(),
  /** The first rows as they would be stored. */
  sample: z.array(
    z.object({
      line: z.number(),
      time: z.date(),
      values: z.record(z.string(), z.union([z.number(), z.string()])),
    }),
  ),
  /** Per-row problems with their line numbers (the first 500). */
  errors: z.array(rowProblem),
});

export const importResult = z.object({
  stored: z.number(),
  duplicates: z.number(),
  goodRows: z.number(),
  skippedBadRows: z.number(),
  channelsCreated: z.array(z.string()),
});
