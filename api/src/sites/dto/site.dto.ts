import { z } from 'zod';
import { timeZone, uuid } from '../../common/schemas.js';

export const siteSchema = z.object({
  id: uuid(),
  name: z.string(),
  locality: z.string(),
  latitude: z.number(),
  longitude: z.number(),
  elevationM: z.number(),
  timeZone: z.string(),
  notes: z.string(),
  reportingIntervalS: z.number().int(),
  createdAt: z.date(),
  updatedAt: z.date(),
});
export type SiteDto = z.infer<typeof siteSchema>;

const name = z
  .string()
  .trim()
  .min(1, 'must not be empty')
  .max(200, 'must be at most 200 characters');

export const createSiteBody = z.object({
  name,
  locality: z.string().trim().max(200).default(''),
  latitude: z.number().min(-90, 'must be between -90 and 90').max(90, 'must be between -90 and 90'),
  longitude: z
    .number()
    .min(-180, 'must be between -180 and 180')
    .max(180, 'must be between -180 and 180'),
  elevationM: z.number().min(-500).max(9000).default(0),
  timeZone: timeZone(),
  notes: z.string().max(5000).default(''),
  reportingIntervalS: z.number().int().min(1).max(86400).default(30),
});
export type CreateSiteBody = z.infer<typeof createSiteBody>;

export const updateSiteBody = z
  .object({
    name,
    locality: z.string().trim().max(200),
    latitude: z.number().min(-90).max(90),
    longitude: z.number().min(-180).max(180),
    elevationM: z.number().min(-500).max(9000),
    timeZone: timeZone(),
    notes: z.string().max(5000),
    reportingIntervalS: z.number().int().min(1).max(86400),
  })
  .partial()
  .refine((v) => Object.keys(v).length > 0, { message: 'must change at least one field' });
export type UpdateSiteBody = z.infer<typeof updateSiteBody>;
