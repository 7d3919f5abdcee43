import { z } from 'zod';
import { isoDateTime, uuid } from '../../common/schemas.js';

export const attachmentSchema = z.object({
  id: uuid(),
  fileName: z.string(),
  contentType: z.enum(['image/jpeg', 'image/png', 'image/webp', 'application/pdf']),
  sizeBytes: z.number(),
  hasThumbnail: z.boolean(),
  createdAt: z.date(),
});

export const visitSchema = z.object({
  id: uuid(),
  siteId: uuid(),
  visitedAt: z.date(),
  technicianId: uuid().nullable(),
  technicianName: z.string().nullable(),
  summary: z.string(),
  findings: z.string(),
  partsReplaced: z.string(),
  createdAt: z.date(),
  updatedAt: z.date(),
  attachments: z.array(attachmentSchema),
});

const fields = {
  visitedAt: isoDateTime(),
  technicianId: uuid().nullable(),
  summary: z.string().trim().min(1, 'must not be empty').max(500, 'must be at most 500 characters'),
  findings: z.string().max(20_000),
  partsReplaced: z.string().max(5000),
};
export const createVisitBody = z.object({
  ...fields,
  technicianId: fields.technicianId.optional(),
  findings: fields.findings.default(''),
  partsReplaced: fields.partsReplaced.default(''),
});
export type CreateVisitBody = z.infer<typeof createVisitBody>;
export const updateVisitBody = z
  .object(fields)
  .partial()
  .refine((v) => Object.keys(v).length > 0, { message: 'must change at least one field' });
export type UpdateVisitBody = z.infer<typeof updateVisitBody>;

export const visitParams = z.object({ siteId: uuid(), visitId: uuid() });
export const attachmentParams = z.object({ siteId: uuid(), attachmentId: uuid() });
export const visitsQuery = z.object({
  limit: z.coerce.number().int().min(1).max(500).default(100),
});
