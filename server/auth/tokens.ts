import { createHash, randomBytes } from 'node:crypto';

/** A link token: 256 random bits, URL-safe. Only its hash is stored. */
export function newLinkToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}

export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}
