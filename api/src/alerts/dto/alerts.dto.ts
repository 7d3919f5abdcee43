import { z } from 'zod';
import { alertKindSchema } from '../../account/dto/account.dto.js';
import { isoDateTime, uuid } from '../../common/schemas.js';

export const alertSettingSchema = z.object({
  kind: alertKindSchema,
  enabled: z.boolean(),
  /** The site's own values (only those it changed). */
  params: z.record(z.string(), z.number()),
  /** The defaults for this site (they depend on its battery chemistry). */
  defaults: z.record(z.string(), z.number()),
  /** What the rules use: the defaults with the site's values over them. */
  effective: z.record(z.string(), z.number()),
  updatedAt: z.date().nullable(),
});

export const alertSettingParams = z.object({ siteId: uuid(), kind: alertKindSchema });
export const putAlertSettingBody = z.object({
  enabled: z.boolean(),
  /** Threshold overrides by name (see `defaults`); an empty object restores the defaults. */
  params: z
    .record(z.string(), z.number().finite('must be a number').min(0, 'must not be negative'))
    .default({}),
});

export const alertSchema = z.object({
  id: uuid(),
  siteId: uuid(),
  siteName: z.string(),
  kind: alertKindSchema,
  subject: z.string(),
  severity: z.enum(['watch', 'act']),
  status: z.enum(['open', 'acknowledged', 'cleared']),
  summary: z.string(),
  evidence: z.unknown(),
  openedAt: z.date(),
  acknowledgedAt: z.date().nullable(),
  acknowledgedBy: z.string().nullable(),
  acknowledgeNote: z.string().nullable(),
  clearedAt: z.date().nullable(),
});

export const alertEventSchema = z.object({
  id: z.number(),
  event: z.enum(['opened', 'acknowledged', 'cleared', 'reopened']),
  at: z.date(),
  userName: z.string().nullable(),
  note: z.string().nullable(),
});

export const alertsQuery = z.object({
  status: z.enum(['open', 'acknowledged', 'cleared', 'active', 'all']).default('active'),
  kind: alertKindSchema.optional(),
  siteId: uuid().optional(),
  from: isoDateTime().optional(),
  to: isoDateTime().optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
  /** Page: alerts opened before this instant. */
  before: isoDateTime().optional(),
});
export type AlertsQuery = z.infer<typeof alertsQuery>;

export const alertParams = z.object({ siteId: uuid(), alertId: uuid() });
export const acknowledgeBody = z.object({
  note: z.string().trim().max(2000, 'must be at most 2,000 characters').default(''),
});
