import { z } from 'zod';
import {
  email,
  password,
  personName,
  roleSchema,
  unitSystemSchema,
  uuid,
} from '../../common/schemas.js';

export const signInBody = z.object({
  email: email(),
  password: z.string().min(1, 'must not be empty').max(200),
});
export type SignInBody = z.infer<typeof signInBody>;

export const meResponse = z.object({
  user: z.object({
    id: uuid(),
    email: z.string(),
    name: z.string(),
    role: roleSchema,
    unitSystem: unitSystemSchema,
    timeZone: z.string(),
  }),
  company: z.object({ id: uuid(), name: z.string() }),
  /** Sites this person may see (owners: linked sites; staff: every company site). */
  siteIds: z.array(uuid()),
});
export type MeResponse = z.infer<typeof meResponse>;

export const tokenParams = z.object({ token: z.string().min(20).max(200) });

export const invitationPreview = z.object({
  email: z.string(),
  name: z.string(),
  role: roleSchema,
  companyName: z.string(),
  expiresAt: z.date(),
});

export const acceptInvitationBody = z.object({
  token: z.string().min(20, 'is not a valid link token').max(200),
  name: personName().optional(),
  password: password(),
});
export type AcceptInvitationBody = z.infer<typeof acceptInvitationBody>;

export const requestResetBody = z.object({ email: email() });
export type RequestResetBody = z.infer<typeof requestResetBody>;

export const confirmResetBody = z.object({
  token: z.string().min(20, 'is not a valid link token').max(200),
  password: password(),
});
export type ConfirmResetBody = z.infer<typeof confirmResetBody>;
