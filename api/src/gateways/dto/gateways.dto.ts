import { z } from 'zod';
import { uuid } from '../../common/schemas.js';

const gatewayId = z
  .string()
  .regex(
    /^[a-z0-9][a-z0-9-]{2,63}$/,
    'must be 3–64 lower-case letters, digits or -, starting with a letter or digit',
  );

export const gatewaySchema = z.object({
  id: z.string(),
  name: z.string(),
  status: z.enum(['active', 'revoked']),
  online: z.boolean(),
  lastSeenAt: z.date().nullable(),
  createdAt: z.date(),
  rotatedAt: z.date().nullable(),
  revokedAt: z.date().nullable(),
});
export type GatewayDto = z.infer<typeof gatewaySchema>;

export const gatewayWithSecret = z.object({
  gateway: gatewaySchema,
  /** The MQTT password; stored only as a hash, so it cannot be shown again. */
  secret: z.string(),
  mqtt: z.object({ username: z.string(), clientId: z.string(), topic: z.string() }),
});

export const createGatewayBody = z.object({
  id: gatewayId,
  name: z.string().trim().max(200).default(''),
});
export const gatewayParams = z.object({ siteId: uuid(), gatewayId: z.string().min(1).max(64) });
export const rejectsQuery = z.object({
  limit: z.coerce.number().int().min(1).max(500).default(100),
});
export const rejectSchema = z.object({
  id: z.number(),
  receivedAt: z.date(),
  recordName: z.string().nullable(),
  recordTime: z.date().nullable(),
  reason: z.string(),
  raw: z.string().nullable(),
});
