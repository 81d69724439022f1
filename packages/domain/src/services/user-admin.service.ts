import { createHash, randomBytes } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { ACCOUNT_LINK_TTL_HOURS, type AccountLinkInfo, type InviteUserRequest, type UpdateUserRequest, type UserRow } from '@earmark/contracts';
import { AccountLink, RefreshSession, User, hashPassword, type AccountLinkPurpose } from '@earmark/db';
import { ConflictError, ForbiddenError, GoneError, NotFoundError } from '../errors.js';
import { composeAccountLinkMail } from '../mail/account-link.mail.js';
import { writeToOutbox } from '../mail/outbox.js';
import { assertKeepsAnAdmin } from '../rules/last-admin.js';
import { recordAudit } from './audit.service.js';
import type { Links } from './links.js';

export function toUserRow(u: User): UserRow {
  return {
    id: u.id,
    email: u.email,
    displayName: u.displayName,
    isAdmin: u.isAdmin,
    disabled: u.disabled,
    status: u.disabled ? 'disabled' : u.awaitingPassword ? 'invited' : 'active',
    createdAt: u.createdAt.toISOString(),
    lastLoginAt: u.lastLoginAt?.toISOString() ?? null,
  };
}

const hashSecret = (secret: string) => createHash('sha256').update(secret).digest('hex');

/** Ends every session of the user: access tokens carry the version, refresh chains are revoked. */
async function endSessions(em: EntityManager, user: User): Promise<void> {
  user.tokenVersion += 1;
  await em.nativeUpdate(RefreshSession, { user, revokedAt: null }, { revokedAt: new Date() });
}

/**
 * People of the workspace as administrators manage them: invitations and password resets by a
 * one-time mailed link (only its hash is stored), disabling, and the administrator flag.
 * Every change is audited; mail goes through the outbox in the same transaction.
 */
export class UserAdminService {
  constructor(private readonly links: Pick<Links, 'accountLinkPage'>) {}

  async list(em: EntityManager): Promise<UserRow[]> {
    const users = await em.find(User, {}, { orderBy: { email: 'asc' } });
    return users.map(toUserRow);
  }

  /** A new link for the user; earlier unused links of the same user stop working. */
  private async issueLink(em: EntityManager, user: User, purpose: AccountLinkPurpose, admin: User): Promise<{ expiresAt: Date }> {
    await em.nativeUpdate(AccountLink, { user, usedAt: null }, { usedAt: new Date() });
    const secret = randomBytes(32).toString('base64url');
    const expiresAt = new Date(Date.now() + ACCOUNT_LINK_TTL_HOURS * 3_600_000);
    em.create(AccountLink, { user, purpose, tokenHash: hashSecret(secret), expiresAt });
    const mail = composeAccountLinkMail({ purpose, recipient: user, sentBy: admin, link: this.links.accountLinkPage(secret), expiresAt });
    writeToOutbox(em, mail, [{ email: user.email, disabled: false }]);
    return { expiresAt };
  }

  /**
   * Creates a person who cannot sign in until they set a password through the mailed link.
   * @throws ConflictError when the e-mail is taken
   */
  async invite(em: EntityManager, input: InviteUserRequest, admin: User): Promise<{ user: User; expiresAt: Date }> {
    const email = input.email.toLowerCase();
    if (await em.findOne(User, { email })) throw new ConflictError(`A user with e-mail ${email} already exists.`);
    // No password works until the invitee chooses one: the hash is of a secret nobody holds.
    const user = em.create(User, { email, displayName: input.displayName, isAdmin: input.isAdmin, awaitingPassword: true, passwordHash: await hashPassword(randomBytes(24).toString('base64url')) });
    const { expiresAt } = await this.issueLink(em, user, 'invite', admin);
    recordAudit(em, { actor: `user:${admin.email}`, action: 'user.invite', subject: `user:${email}`, details: { isAdmin: input.isAdmin, expiresAt: expiresAt.toISOString() } });
    await em.flush();
    return { user, expiresAt };
  }

  private async get(em: EntityManager, userId: string): Promise<User> {
    const user = await em.findOne(User, { id: userId });
    if (!user) throw new NotFoundError('There is no such user.');
    return user;
  }

  /**
   * Disables or enables a person, or changes the administrator flag or name. Disabling ends
   * every session at once. Nobody disables or demotes themselves, and one active admin remains.
   * @throws NotFoundError, ForbiddenError (oneself), ConflictError (the last administrator)
   */
  async update(em: EntityManager, userId: string, change: UpdateUserRequest, admin: User): Promise<User> {
    const user = await this.get(em, userId);
    if (user.id === admin.id && (change.disabled === true || change.isAdmin === false)) {
      throw new ForbiddenError('You cannot disable yourself or take away your own administrator role; ask another administrator.', { code: 'self' });
    }
    const activeAdmins = await em.count(User, { isAdmin: true, disabled: false });
    assertKeepsAnAdmin(user, change, activeAdmins);
    const before: Record<string, unknown> = {};
    const after: Record<string, unknown> = {};
    for (const field of ['disabled', 'isAdmin', 'displayName'] as const) {
      const value = change[field];
      if (value === undefined || value === user[field]) continue;
      before[field] = user[field];
      after[field] = value;
    }
    if (Object.keys(after).length === 0) return user;
    if (change.disabled === true) await endSessions(em, user);
    if (change.disabled !== undefined) user.disabled = change.disabled;
    if (change.isAdmin !== undefined) user.isAdmin = change.isAdmin;
    if (change.displayName !== undefined) user.displayName = change.displayName;
    const action = change.disabled === true && after.disabled ? 'user.disable' : change.disabled === false && after.disabled === false ? 'user.enable' : 'user.update';
    recordAudit(em, { actor: `user:${admin.email}`, action, subject: `user:${user.email}`, change: { before, after } });
    await em.flush();
    return user;
  }

  /**
   * Mails a one-time link to choose a new password (an invitee who has not used theirs gets a
   * fresh invitation). The current password keeps working until the link is used.
   * @throws NotFoundError, ConflictError for a disabled account
   */
  async sendPasswordReset(em: EntityManager, userId: string, admin: User): Promise<{ expiresAt: Date }> {
    const user = await this.get(em, userId);
    if (user.disabled) throw new ConflictError(`${user.email} is disabled; enable the account before resetting its password.`);
    const purpose: AccountLinkPurpose = user.awaitingPassword ? 'invite' : 'reset';
    const { expiresAt } = await this.issueLink(em, user, purpose, admin);
    recordAudit(em, { actor: `user:${admin.email}`, action: purpose === 'invite' ? 'user.invite-resent' : 'user.password-reset', subject: `user:${user.email}`, details: { expiresAt: expiresAt.toISOString() } });
    await em.flush();
    return { expiresAt };
  }

  /** @throws GoneError (410) for a link that is unknown, used, replaced or expired, saying which */
  private async usableLink(em: EntityManager, secret: string): Promise<AccountLink> {
    const link = await em.findOne(AccountLink, { tokenHash: hashSecret(secret) }, { populate: ['user'] });
    if (!link) throw new GoneError('This link is not valid. Ask an administrator to send a new one.', 'account-link-unknown');
    if (link.usedAt) throw new GoneError('This link was already used or replaced by a newer one. Sign in, or ask an administrator to send a new link.', 'account-link-used');
    if (link.expiresAt <= new Date()) {
      throw new GoneError(`This link expired on ${link.expiresAt.toISOString().slice(0, 16).replace('T', ' ')} UTC (links work for ${ACCOUNT_LINK_TTL_HOURS} hours). Ask an administrator to send a new one.`, 'account-link-expired');
    }
    if (link.user.disabled) throw new GoneError('This account is disabled. Ask an administrator.', 'account-disabled');
    return link;
  }

  async describeLink(em: EntityManager, secret: string): Promise<AccountLinkInfo> {
    const link = await this.usableLink(em, secret);
    return { purpose: link.purpose, email: link.user.email, displayName: link.user.displayName, expiresAt: link.expiresAt.toISOString() };
  }

  /** Sets the password, spends the link and ends any session the account had. */
  async redeemLink(em: EntityManager, secret: string, password: string): Promise<void> {
    const link = await this.usableLink(em, secret);
    // Spend the link in one statement first, so two tabs posting the same link cannot both win.
    const spent = await em.nativeUpdate(AccountLink, { id: link.id, usedAt: null }, { usedAt: new Date() });
    if (spent !== 1) throw new GoneError('This link was already used. Sign in with the password you chose.', 'account-link-used');
    const user = link.user;
    user.passwordHash = await hashPassword(password);
    user.awaitingPassword = false;
    await endSessions(em, user);
    recordAudit(em, { actor: `user:${user.email}`, action: link.purpose === 'invite' ? 'user.accept-invite' : 'user.password-set', subject: `user:${user.email}` });
    await em.flush();
  }
}
