import type { EntityManager } from '@mikro-orm/postgresql';
import { ApiToken, Membership, User } from '@earmark/db';
import { parseTokenPrefix, tokenMatches } from '@earmark/platform';
import type { Request } from 'express';
import { AuthError } from '../errors.js';
import type { TokenSigner } from './jwt.js';
import type { Principal } from '@earmark/domain';

function bearer(req: Request): string | null {
  const header = req.headers.authorization;
  if (!header) return null;
  const match = /^Bearer\s+(\S+)$/i.exec(header);
  if (!match?.[1]) throw new AuthError('The Authorization header must be `Bearer <token>`.');
  return match[1];
}

/**
 * Resolves the caller from the Authorization header, or null when there is none.
 * @throws AuthError for a malformed, expired, revoked or unknown credential.
 */
/** Says when, so a pipeline's log tells its owner what to renew (docs/ci.md, "Token expiry"). */
export function tokenExpiredDetail(expiresAt: Date): string {
  const when = `${expiresAt.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
  return `This API token expired on ${when}; a project admin can create a new one on the project's API tokens page.`;
}

/** How fresh a CI token's `lastUsedAt` is kept. */
const LAST_USED_RESOLUTION_MS = 60_000;

export async function authenticate(req: Request, em: EntityManager, signer: TokenSigner): Promise<Principal | null> {
  const credential = bearer(req);
  if (!credential) return null;

  const prefix = parseTokenPrefix(credential);
  if (prefix) {
    const token = await em.findOne(ApiToken, { prefix }, { populate: ['project'] });
    if (!token || !tokenMatches(credential, token.secretHash)) throw new AuthError('Unknown API token.');
    if (token.revokedAt) throw new AuthError('This API token has been revoked.');
    if (token.expiresAt && token.expiresAt <= new Date()) throw new AuthError(tokenExpiredDetail(token.expiresAt), 'token-expired');
    // Once a minute at most: a CI run reads verdicts many times, and a write per read cost more than the read.
    if (!token.lastUsedAt || Date.now() - token.lastUsedAt.getTime() > LAST_USED_RESOLUTION_MS) {
      token.lastUsedAt = new Date();
      await em.flush();
    }
    return { kind: 'token', token, project: token.project };
  }

  const claims = signer.verify(credential, 'access');
  if (!claims) throw new AuthError('The access token is invalid or has expired; sign in again or refresh it.');
  const user = await em.findOne(User, { id: claims.sub });
  if (!user || user.disabled || user.tokenVersion !== claims.ver) throw new AuthError('This session has ended; sign in again.');
  const memberships = await em.find(Membership, { user }, { populate: ['project'], orderBy: { project: { name: 'asc' } } });
  return { kind: 'user', user, memberships };
}
