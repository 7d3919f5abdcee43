import { createHash, randomBytes } from 'node:crypto';

/**
 * Refresh tokens and e-mailed links carry 256-bit random tokens; only their SHA-256 is stored,
 * so a copy of the database cannot be replayed. A fast hash is enough for random tokens.
 */
export function newOpaqueToken(): string {
  return randomBytes(32).toString('base64url');
}

export function hashOpaqueToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}
