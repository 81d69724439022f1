import { Membership, Notification, User } from '@earmark/db';
import { useSeededDatabase } from '@earmark/db/testing';
import { describe, expect, it } from 'vitest';
import { buildMailSubscribersOf, qaManagersOf, renderMail, writeToOutbox } from '../src/index.js';

const seeded = useSeededDatabase();

const message = renderMail({ kind: 'outbox-test', subject: `[Earmark] ${'x'.repeat(320)}`, blocks: [{ type: 'paragraph', content: ['<hello>'] }], footer: { reason: 'Test.' }, payload: { n: 1 } });

describe('writeToOutbox', () => {
  it('writes one pending row per enabled recipient, with both parts, and skips disabled and repeated addresses', async () => {
    const em = seeded.orm.em.fork();
    const written = writeToOutbox(em, message, [
      { email: 'a@example.test', disabled: false },
      { email: 'gone@example.test', disabled: true },
      { email: 'A@example.test', disabled: false },
      { email: 'b@example.test', disabled: false },
    ]);
    await em.flush();
    expect(written).toBe(2);
    const rows = await seeded.orm.em.fork().find(Notification, { kind: 'outbox-test' }, { orderBy: { recipient: 'asc' } });
    expect(rows.map((r) => [r.recipient, r.state])).toEqual([['a@example.test', 'pending'], ['b@example.test', 'pending']]);
    expect(rows[0]!.body).toBe(message.text);
    expect(rows[0]!.html).toBe(message.html);
    expect(rows[0]!.html).toContain('&lt;hello&gt;');
    expect(rows[0]!.payload).toEqual({ n: 1 });
    // The column holds 300 characters.
    expect(rows[0]!.subject).toHaveLength(300);
    expect(rows[0]!.subject.endsWith('…')).toBe(true);
  });
});

describe('recipients', () => {
  it('QA managers of the project, without the people excluded', async () => {
    const em = seeded.orm.em.fork();
    expect((await qaManagersOf(em, seeded.fixture.project)).map((u) => u.email)).toEqual(['qa_manager@example.test']);
    expect(await qaManagersOf(em, seeded.fixture.project, [seeded.fixture.users.qa_manager])).toEqual([]);
  });

  it('subscribers are the members with the setting on: engineers and QA managers by default, not viewers', async () => {
    const em = seeded.orm.em.fork();
    expect((await buildMailSubscribersOf(em, seeded.fixture.project)).map((u) => u.email)).toEqual(['engineer@example.test', 'qa_manager@example.test']);
    const viewer = await em.findOneOrFail(Membership, { project: seeded.fixture.project.id, user: seeded.fixture.users.viewer.id });
    viewer.subscribed = true;
    const disabled = em.create(User, { email: 'disabled@example.test', displayName: 'off', passwordHash: 'x', disabled: true });
    em.create(Membership, { project: seeded.fixture.project.id, user: disabled, role: 'engineer', subscribed: true });
    await em.flush();
    const subscribers = await buildMailSubscribersOf(seeded.orm.em.fork(), seeded.fixture.project);
    expect(subscribers.map((u) => u.email)).toEqual(['disabled@example.test', 'engineer@example.test', 'qa_manager@example.test', 'viewer@example.test']);
    // The writer is what leaves the disabled account out.
    expect(writeToOutbox(seeded.orm.em.fork(), message, subscribers)).toBe(3);
  });
});
