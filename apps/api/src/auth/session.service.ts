import type { EntityManager } from '@mikro-orm/postgresql';
import type { CurrentUser, Session } from '@earmark/contracts';
import { BCRYPT_COST, Membership, User, hashPassword, verifyPassword } from '@earmark/db';
import type { TokenSigner } from '../auth/jwt.js';

import { AuthError } from '../errors.js';
import { recordAudit } from '@earmark/domain';

export function toCurrentUser(user: User, memberships: Membership[]): CurrentUser {
  return {
    id: user.id,
    email: user.email,
    displayName: user.displayName,
    isAdmin: user.isAdmin,
    memberships: memberships.map((m) => ({ projectKey: m.project.key, projectName: m.project.name, role: m.role })),
  };
}

// A real hash to compare against when the e-mail is unknown, so both paths cost the same.
let dummyHash: Promise<string> | null = null;
const getDummyHash = () => (dummyHash ??= hashPassword('no such user', BCRYPT_COST));

/** Sign-in, refresh and sign-out over short-lived JWTs. */
export class SessionService {
  constructor(private readonly signer: TokenSigner) {}

  private async issue(em: EntityManager, user: User): Promise<Session> {
    const memberships = await em.find(Membership, { user }, { populate: ['project'], orderBy: { project: { name: 'asc' } } });
    return {
      accessToken: this.signer.sign({ sub: user.id, typ: 'access', ver: user.tokenVersion }),
      expiresIn: this.signer.ttlSeconds('access'),
      refreshToken: this.signer.sign({ sub: user.id, typ: 'refresh', ver: user.tokenVersion }),
      user: toCurrentUser(user, memberships),
    };
  }

  /** @throws AuthError with one message for unknown e-mail and wrong password alike. */
  async login(em: EntityManager, email: string, password: string): Promise<Session> {
    const user = await em.findOne(User, { email: email.toLowerCase() });
    const ok = await verifyPassword(password, user?.passwordHash ?? (await getDummyHash()));
    if (!user || !ok || user.disabled) {
      recordAudit(em, { actor: `anonymous`, action: 'auth.login_failed', subject: `user:${email.toLowerCase()}` });
      await em.flush();
      throw new AuthError('The e-mail or password is wrong.');
    }
    user.lastLoginAt = new Date();
    recordAudit(em, { actor: `user:${user.email}`, action: 'auth.login', subject: `user:${user.email}` });
    await em.flush();
    return this.issue(em, user);
  }

  /** @throws AuthError when the refresh token is invalid, expired or revoked by sign-out. */
  async refresh(em: EntityManager, refreshToken: string): Promise<Session> {
    const claims = this.signer.verify(refreshToken, 'refresh');
    const user = claims ? await em.findOne(User, { id: claims.sub }) : null;
    if (!claims || !user || user.disabled || user.tokenVersion !== claims.ver) {
      throw new AuthError('The refresh token is invalid or has expired; sign in again.');
    }
    return this.issue(em, user);
  }

  /** Ends every session of the user: all access and refresh tokens stop working. */
  async logout(em: EntityManager, user: User): Promise<void> {
    user.tokenVersion += 1;
    recordAudit(em, { actor: `user:${user.email}`, action: 'auth.logout', subject: `user:${user.email}` });
    await em.flush();
  }
}
