import { Notification } from '@earmark/db';
import { useSeededDatabase } from '@earmark/db/testing';
import { pino } from 'pino';
import { beforeEach, describe, expect, it } from 'vitest';
import { classifyMailFailure } from '../src/jobs/mail-failure.js';
import { sendNotifications } from '../src/jobs/send-notifications.job.js';
import type { Mailer, OutgoingMail } from '../src/mailer.js';

const seeded = useSeededDatabase();
const logger = pino({ level: 'silent' });
const MAX_ATTEMPTS = 3;

/** An SMTP relay that refuses one recipient (as nodemailer reports a 550 on RCPT TO), or is down. */
class FakeMailer implements Mailer {
  sent: string[] = [];
  relayDown = false;
  constructor(private readonly refused: string) {}
  async send(message: OutgoingMail): Promise<void> {
    if (this.relayDown) throw Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:4325'), { code: 'ECONNECTION' });
    if (message.to === this.refused) {
      throw Object.assign(new Error(`Can't send mail - all recipients were rejected: 550 5.1.1 <${message.to}>: no such user`), { code: 'EENVELOPE', responseCode: 550 });
    }
    this.sent.push(message.to);
  }
  close(): void {}
}

async function queueMail(recipients: string[]): Promise<void> {
  const em = seeded.orm.em.fork();
  // Oldest first: the refused recipient is written first, so oldest-first sending meets it first.
  recipients.forEach((recipient, i) => {
    em.create(Notification, { kind: 'test', recipient, subject: `to ${recipient}`, body: 'hello', createdAt: new Date(Date.now() - 60_000 + i * 1000) });
  });
  await em.flush();
}

async function rows(): Promise<Record<string, Pick<Notification, 'state' | 'attempts' | 'lastError' | 'nextAttemptAt'>>> {
  const all = await seeded.orm.em.fork().find(Notification, {}, { orderBy: { createdAt: 'asc' } });
  return Object.fromEntries(all.map((n) => [n.recipient, { state: n.state, attempts: n.attempts, lastError: n.lastError, nextAttemptAt: n.nextAttemptAt }]));
}

beforeEach(async () => {
  await seeded.orm.em.fork().nativeDelete(Notification, {});
});

describe('the mail outbox', () => {
  it('sends the rest of the batch when the relay refuses one recipient', async () => {
    await queueMail(['', 'ana@example.test', 'ben@example.test']);
    const mailer = new FakeMailer('');
    await sendNotifications({ orm: seeded.orm, mailer, logger, maxAttempts: MAX_ATTEMPTS }).catch(() => undefined);

    expect(mailer.sent).toEqual(['ana@example.test', 'ben@example.test']);
    const after = await rows();
    expect(after['ana@example.test']?.state).toBe('sent');
    expect(after['ben@example.test']?.state).toBe('sent');
    expect(after['']).toMatchObject({ state: 'pending', attempts: 1 });
    expect(after['']?.lastError).toMatch(/550 5\.1\.1/);
  });

  it('retries a refused message with back-off and marks it failed after the last attempt', async () => {
    await queueMail(['nobody@example.test', 'cleo@example.test']);
    const mailer = new FakeMailer('nobody@example.test');
    let clock = Date.now();
    const deps = { orm: seeded.orm, mailer, logger, maxAttempts: MAX_ATTEMPTS, now: () => new Date(clock) };

    await sendNotifications(deps);
    const first = (await rows())['nobody@example.test'];
    expect(first).toMatchObject({ state: 'pending', attempts: 1 });
    const firstDelay = first!.nextAttemptAt!.getTime() - clock;
    expect(firstDelay).toBeGreaterThan(0);

    // Not yet due: a second run right away does not try it again.
    await sendNotifications(deps);
    expect((await rows())['nobody@example.test']?.attempts).toBe(1);

    clock += firstDelay + 1;
    await sendNotifications(deps);
    const second = (await rows())['nobody@example.test'];
    expect(second).toMatchObject({ state: 'pending', attempts: 2 });
    // The wait doubles.
    expect(second!.nextAttemptAt!.getTime() - clock).toBe(firstDelay * 2);

    clock = second!.nextAttemptAt!.getTime() + 1;
    await sendNotifications(deps);
    const last = (await rows())['nobody@example.test'];
    expect(last).toMatchObject({ state: 'failed', attempts: MAX_ATTEMPTS, nextAttemptAt: null });
    expect(last?.lastError).toMatch(/no such user/);

    // A failed row is never tried again.
    clock += 24 * 3600_000;
    await sendNotifications(deps);
    expect((await rows())['nobody@example.test']?.attempts).toBe(MAX_ATTEMPTS);
    expect(mailer.sent).toEqual(['cleo@example.test']);
  });

  it('keeps every row pending, attempts uncounted, when the relay is down, and throws so the job is retried', async () => {
    await queueMail(['dora@example.test', 'eli@example.test']);
    const mailer = new FakeMailer('');
    mailer.relayDown = true;
    await expect(sendNotifications({ orm: seeded.orm, mailer, logger, maxAttempts: MAX_ATTEMPTS })).rejects.toThrow(/relay/i);

    const down = await rows();
    expect(down['dora@example.test']).toMatchObject({ state: 'pending', attempts: 0, nextAttemptAt: null });
    expect(down['dora@example.test']?.lastError).toMatch(/ECONNREFUSED/);
    expect(down['eli@example.test']).toMatchObject({ state: 'pending', attempts: 0, lastError: null });

    mailer.relayDown = false;
    await sendNotifications({ orm: seeded.orm, mailer, logger, maxAttempts: MAX_ATTEMPTS });
    expect(mailer.sent).toEqual(['dora@example.test', 'eli@example.test']);
  });
});

describe('classifyMailFailure', () => {
  it('tells a relay that cannot be reached from a message the relay refuses', () => {
    expect(classifyMailFailure(Object.assign(new Error('timeout'), { code: 'ETIMEDOUT' }))).toBe('relay');
    expect(classifyMailFailure(Object.assign(new Error('socket'), { code: 'ESOCKET' }))).toBe('relay');
    expect(classifyMailFailure(Object.assign(new Error('421 closing'), { code: 'EENVELOPE', responseCode: 421 }))).toBe('relay');
    expect(classifyMailFailure(Object.assign(new Error('550 no such user'), { code: 'EENVELOPE', responseCode: 550 }))).toBe('message');
    expect(classifyMailFailure(Object.assign(new Error('554 rejected'), { code: 'EMESSAGE', responseCode: 554 }))).toBe('message');
    expect(classifyMailFailure(new Error('something odd'))).toBe('message');
  });

  it('a worker that dies mid-batch leaves at most the message it was sending to be repeated, under the same Message-ID key', async () => {
    const recipients = ['a@example.test', 'b@example.test', 'c@example.test', 'd@example.test', 'e@example.test'];
    await queueMail(recipients);
    const relay: Array<{ to: string; key: string | undefined }> = [];
    let sendingThird!: () => void;
    const thirdStarted = new Promise<void>((resolve) => (sendingThird = resolve));
    // Worker A: the relay accepts two messages, then A "dies" while the third is on the wire (it never returns).
    const dying: Mailer = {
      async send(m) {
        if (relay.length === 2) {
          relay.push({ to: m.to, key: m.messageKey });
          sendingThird();
          return new Promise<void>(() => {});
        }
        relay.push({ to: m.to, key: m.messageKey });
      },
      close() {},
    };
    void sendNotifications({ orm: seeded.orm, mailer: dying, logger, maxAttempts: MAX_ATTEMPTS });
    await thirdStarted;
    // Worker B at once: A's claim hides the rest, so B sends nothing twice.
    const healthy: Mailer = { send: async (m) => void relay.push({ to: m.to, key: m.messageKey }), close() {} };
    await sendNotifications({ orm: seeded.orm, mailer: healthy, logger, maxAttempts: MAX_ATTEMPTS });
    expect(relay).toHaveLength(3);
    // Worker B after A's claim lapsed (2 min): the unsent rest, with the one A was sending repeated.
    await sendNotifications({ orm: seeded.orm, mailer: healthy, logger, maxAttempts: MAX_ATTEMPTS, now: () => new Date(Date.now() + 3 * 60_000) });
    expect(relay.map((r) => r.to)).toEqual([...recipients.slice(0, 3), ...recipients.slice(2)]);
    const ids = Object.fromEntries((await seeded.orm.em.fork().find(Notification, {})).map((n) => [n.recipient, n.id]));
    expect(relay.every((r) => r.key === ids[r.to])).toBe(true);
    expect(Object.values(await rows()).map((r) => r.state)).toEqual(['sent', 'sent', 'sent', 'sent', 'sent']);
  });

  it('a worker whose claim ran out while the relay was slow leaves the rest of its batch to the worker that claimed it', async () => {
    const recipients = ['a@example.test', 'b@example.test', 'c@example.test', 'd@example.test'];
    await queueMail(recipients);
    const relay: string[] = [];
    let releaseFirst!: () => void;
    const firstReleased = new Promise<void>((resolve) => (releaseFirst = resolve));
    let firstStarted!: () => void;
    const firstOnTheWire = new Promise<void>((resolve) => (firstStarted = resolve));
    // Worker A: the relay takes longer than the claim over its first message.
    const slow: Mailer = {
      async send(m) {
        if (relay.length === 0) {
          firstStarted();
          await firstReleased;
        }
        relay.push(m.to);
      },
      close() {},
    };
    const runA = sendNotifications({ orm: seeded.orm, mailer: slow, logger, maxAttempts: MAX_ATTEMPTS });
    await firstOnTheWire;
    // Worker B three minutes later: A's claim on the other three has lapsed; B claims and sends them.
    const healthy: Mailer = { send: async (m) => void relay.push(m.to), close() {} };
    await sendNotifications({ orm: seeded.orm, mailer: healthy, logger, maxAttempts: MAX_ATTEMPTS, now: () => new Date(Date.now() + 3 * 60_000) });
    releaseFirst();
    await runA;
    // A finishes its first message and finds the rest no longer its own: nothing after it is sent twice.
    for (const r of recipients.slice(1)) expect(relay.filter((to) => to === r), r).toHaveLength(1);
    expect(Object.values(await rows()).every((r) => r.state === 'sent')).toBe(true);
  });
});
