import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';

// Format: em_<prefix>_<secret>. The prefix is public (shown in lists, used for look-up);
// only the SHA-256 of the whole token is stored.
const TOKEN_PATTERN = /^em_([a-z0-9]{10})_([A-Za-z0-9_-]{43})$/;

export interface NewTokenSecret {
  token: string;
  prefix: string;
  hash: string;
}

export const hashToken = (token: string): string => createHash('sha256').update(token).digest('hex');

export function generateTokenSecret(): NewTokenSecret {
  const alphabet = 'abcdefghijklmnopqrstuvwxyz0123456789';
  const prefix = Array.from(randomBytes(10), (b) => alphabet[b % alphabet.length]).join('');
  const token = `em_${prefix}_${randomBytes(32).toString('base64url')}`;
  return { token, prefix, hash: hashToken(token) };
}

/** The prefix of a well-formed API token, or null when the string is not one. */
export function parseTokenPrefix(token: string): string | null {
  return TOKEN_PATTERN.exec(token)?.[1] ?? null;
}

export function tokenMatches(token: string, storedHash: string): boolean {
  const a = Buffer.from(hashToken(token), 'hex');
  const b = Buffer.from(storedHash, 'hex');
  return a.length === b.length && timingSafeEqual(a, b);
}
