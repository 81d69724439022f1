import { CreateUserRequest } from '@earmark/contracts';
import { User, hashPassword } from '@earmark/db';
import { recordAudit } from '@earmark/domain';
import type { MikroORM } from '@mikro-orm/postgresql';

/** There is an administrator already: further ones are invited from the dashboard by an admin. */
export class AdminExistsError extends Error {
  override name = 'AdminExistsError';
}

/**
 * The first administrator of a new installation. Once one exists the command refuses, so it
 * cannot become a way around the dashboard's invitations and their audit trail.
 * @throws AdminExistsError when an administrator exists already
 * @throws ZodError when the e-mail, name or password is not acceptable
 */
export async function createFirstAdmin(orm: MikroORM, input: { email: string; displayName: string; password: string }): Promise<User> {
  const body = CreateUserRequest.parse({ ...input, isAdmin: true });
  const passwordHash = await hashPassword(body.password);
  return orm.em.fork().transactional(async (em) => {
    // Serialises two first-admin commands run at once: only one can see "no admin yet".
    await em.getConnection().execute('lock table app_user in share row exclusive mode', [], 'run', em.getTransactionContext());
    const admins = await em.count(User, { isAdmin: true });
    if (admins > 0) throw new AdminExistsError(`an administrator exists already (${admins}); as that administrator, add further users through the API (POST /api/admin/users)`);
    const user = em.create(User, { email: body.email.toLowerCase(), displayName: body.displayName, passwordHash, isAdmin: true });
    recordAudit(em, { actor: 'system:create-admin', action: 'user.create', subject: `user:${user.email}`, details: { isAdmin: true, via: 'earmark-admin create-admin' } });
    return user;
  });
}
