import net from 'node:net';
import { demoProjects, demoUsers, initOrm, Membership, Project, seedDemo, User, ApiToken } from '@earmark/db';
import { generateTokenSecret, hashToken } from '@earmark/platform';
import { createTestDatabase } from '@earmark/db/testing';
import { assertPortFree } from '@earmark/infra/ports';
import { describe, expect, it } from 'vitest';

describe('npm start set-up', () => {
  it('names the port and the variable to change when a port is taken', async () => {
    const blocker = net.createServer();
    await new Promise<void>((resolve) => blocker.listen(0, '127.0.0.1', resolve));
    const port = (blocker.address() as net.AddressInfo).port;
    try {
      await expect(assertPortFree(port, 'the API', 'EARMARK_API_PORT')).rejects.toThrow(
        new RegExp(`Port ${port} on 127\\.0\\.0\\.1 is already in use.*EARMARK_API_PORT=<port>`),
      );
    } finally {
      blocker.close();
    }
    await expect(assertPortFree(port, 'the API', 'EARMARK_API_PORT')).resolves.toBeUndefined();
  });

  it('seeds the demo once: a second start adds nothing', async () => {
    const db = await createTestDatabase();
    const orm = await initOrm({ url: db.url, poolMax: 2 });
    try {
      const token = generateTokenSecret();
      expect(await seedDemo(orm.em.fork(), token)).toEqual({ created: true });
      expect(await seedDemo(orm.em.fork(), generateTokenSecret())).toEqual({ created: false });

      const em = orm.em.fork();
      expect(await em.count(User)).toBe(demoUsers.length);
      expect((await em.find(Project, {}, { orderBy: { key: 'asc' } })).map((p) => p.key)).toEqual(demoProjects.map((p) => p.key).sort());
      // Every demo user with a project role is a member of each project; the admin is global.
      expect(await em.count(Membership)).toBe(demoProjects.length * demoUsers.filter((u) => u.role).length);
      const admin = await em.findOneOrFail(User, { email: 'admin@fernwick.test' });
      expect(admin.isAdmin).toBe(true);
      // The demo CI token is stored hashed; its secret is only what the caller kept.
      const stored = await em.findOneOrFail(ApiToken, { prefix: token.prefix });
      expect(stored.secretHash).toBe(hashToken(token.token));
    } finally {
      await orm.close();
      await db.drop();
    }
  });
});
