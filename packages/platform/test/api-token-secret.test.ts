import { describe, expect, it } from 'vitest';
import { generateTokenSecret, hashToken, parseTokenPrefix, tokenMatches } from '../src/index.js';

describe('CI token secrets', () => {
  it('a generated token parses back to its prefix and matches only its own hash', () => {
    const secret = generateTokenSecret();
    expect(secret.token.startsWith(`em_${secret.prefix}_`)).toBe(true);
    expect(parseTokenPrefix(secret.token)).toBe(secret.prefix);
    expect(tokenMatches(secret.token, secret.hash)).toBe(true);
    expect(tokenMatches(generateTokenSecret().token, secret.hash)).toBe(false);
    // SHA-256 hex (FIPS 180-4): 64 hex digits, never the token itself.
    expect(hashToken(secret.token)).toMatch(/^[0-9a-f]{64}$/);
    expect(secret.hash).not.toContain(secret.token);
  });
});
