import { z } from 'zod';

/** Small shared zod pieces, so every route words the same problems the same way. */
// Any 8-4-4-4-12 hex id (PostgreSQL's uuid type), not only RFC-variant ones.
export const uuid = () => z.guid({ message: 'must be an id (UUID)' });
export const email = () =>
  z
    .string()
    .trim()
    .max(254, 'must be at most 254 characters')
    .pipe(z.email({ message: 'must be an e-mail address' }));
export const password = () =>
  z.string().min(10, 'must be at least 10 characters').max(200, 'must be at most 200 characters');
export const personName = () =>
  z.string().trim().min(1, 'must not be empty').max(200, 'must be at most 200 characters');
export const isoDateTime = () =>
  z.iso
    .datetime({
      offset: true,
      message: 'must be an ISO 8601 date and time, e.g. 2026-01-31T06:00:00Z',
    })
    .transform((s) => new Date(s));
export const timeZone = () =>
  z.string().refine(isTimeZone, { message: 'must be an IANA time zone such as America/Denver' });
export const roleSchema = z.enum(['admin', 'technician', 'owner']);
export const unitSystemSchema = z.enum(['us', 'metric']);

export function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat('en', { timeZone: tz });
    return tz.length > 0;
  } catch {
    return false;
  }
}

export const siteParams = z.object({ siteId: uuid() });
export type SiteParams = z.infer<typeof siteParams>;

/** A page of items with an opaque cursor for the next page. */
export const pageQuery = {
  limit: z.coerce.number().int().min(1).max(500).default(100),
};
