import { z } from 'zod';
import { personName, timeZone, unitSystemSchema, uuid } from '../../common/schemas.js';

export const ALERT_KINDS = [
  'low_charge',
  'overnight_sag',
  'float_stuck',
  'dry_run',
  'short_cycling',
  'gateway_silent',
  'water_low',
  'no_charge',
] as const;
export const alertKindSchema = z.enum(ALERT_KINDS);
export type AlertKind = z.infer<typeof alertKindSchema>;

const clock = z
  .string()
  .regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'must be a time of day as HH:MM (24-hour)');

export const accountSettings = z.object({
  name: z.string(),
  email: z.string(),
  unitSystem: unitSystemSchema,
  timeZone: z.string(),
  /** No e-mail between start and end (local time); null for none. */
  quietHours: z.object({ start: clock, end: clock }).nullable(),
});

export const updateAccountBody = z
  .object({
    name: personName(),
    unitSystem: unitSystemSchema,
    timeZone: timeZone(),
    quietHours: z
      .object({ start: clock, end: clock })
      .refine((q) => q.start !== q.end, { message: 'start and end must differ', path: ['end'] })
      .nullable(),
  })
  .partial()
  .refine((v) => Object.keys(v).length > 0, { message: 'must change at least one field' });
export type UpdateAccountBody = z.infer<typeof updateAccountBody>;

export const notificationPreferences = z.object({
  /** Alert kinds to e-mail about. */
  kinds: z.array(alertKindSchema),
  /** Only these sites; null for every site the person may see. */
  siteIds: z.array(uuid()).nullable(),
  onOpen: z.boolean(),
  onClear: z.boolean(),
});
export type NotificationPreferences = z.infer<typeof notificationPreferences>;
