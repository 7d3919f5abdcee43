import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';

/**
 * Gateway secrets are 256-bit random tokens, not passwords people choose, so a fast hash is
 * enough to keep them unreadable at rest (a slow hash would cost seconds of CPU when thousands
 * of gateways reconnect at once). Comparison is constant-time.
 */
export function newGatewaySecret(): string {
  return randomBytes(32).toString('base64url');
}

export function hashGatewaySecret(secret: string): string {
  return `sha256:${createHash('sha256').update(secret, 'utf8').digest('hex')}`;
}

export function verifyGatewaySecret(secret: string, stored: string): boolean {
  const expected = Buffer.from(stored, 'utf8');
  const actual = Buffer.from(hashGatewaySecret(secret), 'utf8');
  return expected.length === actual.length && timingSafeEqual(expected, actual);
}
