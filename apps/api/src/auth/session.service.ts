import { randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { CurrentUser, Session } from '@earmark/contracts';
import { BCRYPT_COST, Membership, RefreshSession, User, hashPassword } from '@earmark/db';
import type { TokenSigner } from '../auth/jwt.js';
import { inlinePasswordChecks, type PasswordChecks } from './password-checks.js';

import { AuthError, ValidationError } from '../errors.js';
import { recordAudit } from '@earmark/domain';

/**
 * The signed-in user with their project roles. Roles in archived projects are left out for
 * everyone, administrators included: archived projects appear only in the admin screens.
 */
export function toCurrentUser(user: User, memberships: Membership[]): CurrentUser {
  return {
    id: user.id,
    email: user.email,
    displayName: user.displayName,
    isAdmin: user.isAdmin,
    memberships: memberships.filter((m) => !m.project.archivedAt).map((m) => ({ projectKey: m.project.key, projectName: m.project.name, role: m.role })),
  };
}

// A real hash to compare against when the e-mail is unknown, so both paths cost the same.
let dummyHash: Promise<string> | null = null;
const getDummyHash = () => (dummyHash ??= hashPassword('no such user', BCRYPT_COST));

/** Sign-in, refresh and sign-out over short-lived JWTs. */
export class SessionService {
  constructor(
    private readonly signer: TokenSigner,
    private readonly passwords: PasswordChecks = inlinePasswordChecks,
  ) {}

  /** Issues a session whose refresh token is the current one of `family`. */
  private async issue(em: EntityManager, user: User, family: RefreshSession): Promise<Session> {
    const memberships = await em.find(Membership, { user }, { populate: ['project'], orderBy: { project: { name: 'asc' } } });
    return {
      accessToken: this.signer.sign({ sub: user.id, typ: 'access', ver: user.tokenVersion }),
      expiresIn: this.signer.ttlSeconds('access'),
      refreshToken: this.signer.sign({ sub: user.id, typ: 'refresh', ver: user.tokenVersion, jti: family.currentJti, fam: family.id }),
      user: toCurrentUser(user, memberships),
    };
  }

  /** @throws AuthError with one message for unknown e-mail and wrong password alike. */
  async login(em: EntityManager, email: string, password: string): Promise<Session> {
    const user = await em.findOne(User, { email: email.toLowerCase() });
    const ok = await this.passwords.verify(password, user?.passwordHash ?? (await getDummyHash()));
    if (!user || !ok || user.disabled) {
      recordAudit(em, { actor: `anonymous`, action: 'auth.login_failed', subject: `user:${email.toLowerCase()}` });
      await em.flush();
      throw new AuthError('The e-mail or password is wrong.');
    }
    user.lastLoginAt = new Date();
    const family = em.create(RefreshSession, {
      user,
      currentJti: randomUUID(),
      expiresAt: new Date(Date.now() + this.signer.ttlSeconds('refresh') * 1000),
    });
    recordAudit(em, { actor: `user:${user.email}`, action: 'auth.login', subject: `user:${user.email}` });
    await em.flush();
    return this.issue(em, user, family);
  }

  /**
   * Rotates: the presented refresh token is spent and the answer carries its successor. A token
   * that was already spent means two parties hold the chain (one of them stole it), so the whole
   * chain ends and both must sign in again.
   * @throws AuthError when the token is invalid, expired, spent, or its chain was ended.
   */
  async refresh(em: EntityManager, refreshToken: string): Promise<Session> {
    const invalid = () => new AuthError('The refresh token is invalid or has expired; sign in again.');
    const claims = this.signer.verify(refreshToken, 'refresh');
    if (!claims?.jti || !claims.fam) throw invalid();
    const user = await em.findOne(User, { id: claims.sub });
    const family = await em.findOne(RefreshSession, { id: claims.fam, user: claims.sub });
    if (!user || !family || user.disabled || user.tokenVersion !== claims.ver || family.revokedAt || family.expiresAt <= new Date()) {
      throw invalid();
    }
    // Compare-and-swap in one statement, so two concurrent refreshes with one token cannot both win.
    const nextJti = randomUUID();
    const swapped = await em.nativeUpdate(RefreshSession, { id: family.id, currentJti: claims.jti, revokedAt: null }, { currentJti: nextJti });
    if (swapped !== 1) {
      await em.nativeUpdate(RefreshSession, { id: family.id }, { revokedAt: new Date() });
      recordAudit(em, { actor: 'anonymous', action: 'auth.refresh_reused', subject: `user:${user.email}`, details: { family: family.id } });
      await em.flush();
      throw invalid();
    }
    family.currentJti = nextJti;
    return this.issue(em, user, family);
  }

  /**
   * Changes the signed-in user's own password. Every session of the user ends (access tokens by
   * the version bump, refresh chains by revocation), so a thief holding one is locked out; the
   * caller gets a fresh session in the answer and stays signed in.
   * @throws ValidationError (422, naming `currentPassword`) when the current password is wrong.
   */
  async changePassword(em: EntityManager, user: User, currentPassword: string, newPassword: string): Promise<Session> {
    if (!(await this.passwords.verify(currentPassword, user.passwordHash))) {
      recordAudit(em, { actor: `user:${user.email}`, action: 'auth.password_change_failed', subject: `user:${user.email}` });
      await em.flush();
      throw new ValidationError('The current password is wrong; the password was not changed.', [{ path: 'body.currentPassword', message: 'does not match the password you sign in with' }]);
    }
    user.passwordHash = await hashPassword(newPassword);
    user.tokenVersion += 1;
    const ended = await em.nativeUpdate(RefreshSession, { user, revokedAt: null }, { revokedAt: new Date() });
    const family = em.create(RefreshSession, {
      user,
      currentJti: randomUUID(),
      expiresAt: new Date(Date.now() + this.signer.ttlSeconds('refresh') * 1000),
    });
    recordAudit(em, { actor: `user:${user.email}`, action: 'auth.password_changed', subject: `user:${user.email}`, details: { sessionsEnded: ended } });
    await em.flush();
    return this.issue(em, user, family);
  }

  /** Ends every session of the user: all access and refresh tokens stop working. */
  async logout(em: EntityManager, user: User): Promise<void> {
    user.tokenVersion += 1;
    await em.nativeUpdate(RefreshSession, { user, revokedAt: null }, { revokedAt: new Date() });
    recordAudit(em, { actor: `user:${user.email}`, action: 'auth.logout', subject: `user:${user.email}` });
    await em.flush();
  }
}
