import { z } from 'zod';
import { email, personName, roleSchema, uuid } from '../../common/schemas.js';

export const userSchema = z.object({
  id: uuid(),
  email: z.string(),
  name: z.string(),
  role: roleSchema,
  active: z.boolean(),
  lastSignInAt: z.date().nullable(),
  createdAt: z.date(),
  /** Owners: the sites they are linked to. */
  siteIds: z.array(uuid()),
});
export type UserDto = z.infer<typeof userSchema>;

export const userParams = z.object({ userId: uuid() });
export type UserParams = z.infer<typeof userParams>;

export const updateUserBody = z
  .object({
    role: roleSchema,
    name: personName(),
    /** Owners only: replaces the linked sites. */
    siteIds: z.array(uuid()).max(500),
  })
  .partial()
  .refine((v) => Object.keys(v).length > 0, { message: 'must change at least one field' });
export type UpdateUserBody = z.infer<typeof updateUserBody>;

export const inviteBody = z
  .object({
    email: email(),
    name: z.string().trim().max(200).default(''),
    role: roleSchema,
    /** Sites an owner will see; required (at least one) for owners, empty for staff. */
    siteIds: z.array(uuid()).max(500).default([]),
  })
  .superRefine((v, ctx) => {
    if (v.role === 'owner' && v.siteIds.length === 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['siteIds'],
        message: 'an owner must be linked to at least one site',
      });
    }
    if (v.role !== 'owner' && v.siteIds.length > 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['siteIds'],
        message: 'only owners are linked to sites',
      });
    }
  });
export type InviteBody = z.infer<typeof inviteBody>;

export const invitationSchema = z.object({
  id: uuid(),
  email: z.string(),
  name: z.string(),
  role: roleSchema,
  siteIds: z.array(uuid()),
  status: z.enum(['pending', 'used', 'revoked', 'expired']),
  expiresAt: z.date(),
  createdAt: z.date(),
});
export type InvitationDto = z.infer<typeof invitationSchema>;

export const invitationParams = z.object({ invitationId: uuid() });
export type InvitationParams = z.infer<typeof invitationParams>;
