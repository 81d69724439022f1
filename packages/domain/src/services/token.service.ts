import type { EntityManager } from '@mikro-orm/postgresql';
import type { ApiTokenRow, CreateApiTokenRequest, CreatedApiToken } from '@earmark/contracts';
import { ApiToken, type Project, type User } from '@earmark/db';
import { generateTokenSecret } from '@earmark/platform';

import { NotFoundError, ValidationError } from '../errors.js';
import { recordAudit } from './audit.service.js';

function toRow(token: ApiToken): ApiTokenRow {
  return {
    id: token.id,
    name: token.name,
    prefix: token.prefix,
    scopes: token.scopes,
    createdAt: token.createdAt.toISOString(),
    lastUsedAt: token.lastUsedAt?.toISOString() ?? null,
    revokedAt: token.revokedAt?.toISOString() ?? null,
    expiresAt: token.expiresAt?.toISOString() ?? null,
  };
}

/** CI tokens: created by admins, secret shown once, stored hashed, revocable. */
export class TokenService {
  async list(em: EntityManager, project: Project): Promise<ApiTokenRow[]> {
    const tokens = await em.find(ApiToken, { project }, { orderBy: { createdAt: 'desc' } });
    return tokens.map(toRow);
  }

  /** @throws ValidationError when `expiresAt` is not in the future (a token born expired helps no pipeline). */
  async create(em: EntityManager, project: Project, input: CreateApiTokenRequest, creator: User, now = new Date()): Promise<CreatedApiToken> {
    const expiresAt = input.expiresAt ? new Date(input.expiresAt) : null;
    if (expiresAt && expiresAt <= now) {
      throw new ValidationError('The token would expire before it is used.', [{ path: 'body.expiresAt', message: `must be in the future (it is ${expiresAt.toISOString()})` }]);
    }
    const secret = generateTokenSecret();
    const token = em.create(ApiToken, {
      project,
      name: input.name,
      prefix: secret.prefix,
      secretHash: secret.hash,
      scopes: [...new Set(input.scopes)],
      createdBy: creator,
      expiresAt,
    });
    recordAudit(em, { actor: `user:${creator.email}`, action: 'token.create', subject: `token:${secret.prefix}`, project, details: { name: input.name, scopes: token.scopes, expiresAt: expiresAt?.toISOString() ?? null } });
    await em.flush();
    return { ...toRow(token), secret: secret.token };
  }

  /** Idempotent: revoking a revoked token keeps its first revocation time. */
  async revoke(em: EntityManager, project: Project, tokenId: string, actor: User): Promise<ApiTokenRow> {
    const token = await em.findOne(ApiToken, { id: tokenId, project });
    if (!token) throw new NotFoundError(`There is no API token ${tokenId} in ${project.key}.`);
    if (!token.revokedAt) {
      token.revokedAt = new Date();
      recordAudit(em, { actor: `user:${actor.email}`, action: 'token.revoke', subject: `token:${token.prefix}`, project });
      await em.flush();
    }
    return toRow(token);
  }
}
