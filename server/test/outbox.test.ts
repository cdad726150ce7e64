import type { DataSource } from 'typeorm';
import { createDataSource } from '../src/database/data-source';
import { createLogger } from '../src/logger';
import type { MailMessage, Mailer } from '../src/notifications/domain/mailer';
import { enqueueEmail, type OutboxEmail } from '../src/notifications/domain/outbox';
import { OutboxWorker, type OutboxWorkerOptions } from '../src/notifications/domain/outbox-worker';
import { startTestApp, type TestApp } from './helpers/app';
import { jsonColumn, makeOrganisation, makePerson, unique } from './helpers/factories';
import { signedInClient } from './helpers/http';
import { RecordingMailer } from './helpers/recording-mailer';

// The outbox against the real MariaDB. The app's own worker is off: each test drives workers
// of its own, and starts from an empty outbox (files of one Jest worker run one after another
// on that worker's database, so nobody else is using the table meanwhile).
let t: TestApp;
const logger = createLogger('silent');
const uuidV4 = /^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/;

beforeAll(async () => {
  t = await startTestApp({}, { outboxWorker: false });
});
afterAll(() => t.close());
beforeEach(async () => {
  await t.dataSource.query('DELETE FROM outbox_messages');
});

function email(overrides: Partial<OutboxEmail> = {}): OutboxEmail {
  return {
    to: `outbox.${unique()}@test.example`,
    subject: 'Loan EV-2027-000042 confirmed',
    html: '<p>Confirmed.</p>',
    text: 'Confirmed.',
    ...overrides,
  };
}

function worker(
  mailer: Mailer,
  overrides: Partial<OutboxWorkerOptions['settings']> = {},
  options: Partial<OutboxWorkerOptions> = {},
): OutboxWorker {
  return new OutboxWorker({
    dataSource: t.dataSource,
    mailer,
    logger,
    messageIdDomain: 'evalon.example',
    settings: { ...t.config.outbox, pollIntervalMs: 20, ...overrides },
    ...options,
  });
}

interface RawRow {
  id: number;
  message_id: string;
  status: string;
  attempts: number;
  next_attempt_at: Date;
  last_error: string | null;
  locked_by: string | null;
  locked_until: Date | null;
  sent_at: Date | null;
}

async function rowOf(messageId: string): Promise<RawRow> {
  const [row] = await t.dataSource.query('SELECT * FROM outbox_messages WHERE message_id = ?', [
    messageId,
  ]);
  return row as RawRow;
}

/** A transport that refuses like an SMTP server that is not there. */
class DownMailer implements Mailer {
  calls = 0;
  async send(): Promise<void> {
    this.calls += 1;
    throw Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:1025'), {
      code: 'ECONNREFUSED',
    });
  }
}

async function waitUntil(check: () => Promise<boolean>, timeoutMs = 10_000): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 25));
  }
  throw new Error(`condition not met within ${timeoutMs} ms`);
}

describe('enqueueEmail', () => {
  it('writes nothing when the caller’s transaction rolls back, and one pending row when it commits', async () => {
    const to = `rollback.${unique()}@test.example`;
    await expect(
      t.dataSource.transaction(async (m) => {
        await enqueueEmail(m, email({ to }));
        throw new Error('the business change failed');
      }),
    ).rejects.toThrow('the business change failed');
    const none = await t.dataSource.query(
      'SELECT COUNT(*) AS n FROM outbox_messages WHERE JSON_CONTAINS(to_addresses, JSON_QUOTE(?))',
      [to],
    );
    expect(Number(none[0].n)).toBe(0);

    const now = new Date('2030-01-02T03:04:05.678Z');
    const id = await t.dataSource.transaction((m) => enqueueEmail(m, email({ to }), now));
    expect(id).toMatch(uuidV4);
    const [row] = await t.dataSource.query('SELECT * FROM outbox_messages WHERE message_id = ?', [
      id,
    ]);
    expect(row).toMatchObject({ kind: 'email', status: 'pending', attempts: 0, sent_at: null });
    expect(jsonColumn(row.to_addresses)).toEqual([to]);
    expect(new Date(row.next_attempt_at).toISOString()).toBe(now.toISOString());
    expect(new Date(row.created_at).toISOString()).toBe(now.toISOString());
  });

  it('gives one message for one dedupe key, even from two concurrent transactions', async () => {
    const dedupeKey = `loan:${unique()}:confirmed:user:7`;
    const [a, b] = await Promise.all([
      t.dataSource.transaction((m) => enqueueEmail(m, email({ dedupeKey }))),
      t.dataSource.transaction((m) => enqueueEmail(m, email({ dedupeKey }))),
    ]);
    expect(a).toBe(b);
    const again = await t.dataSource.transaction((m) => enqueueEmail(m, email({ dedupeKey })));
    expect(again).toBe(a);
    const rows = await t.dataSource.query(
      'SELECT message_id FROM outbox_messages WHERE dedupe_key = ?',
      [dedupeKey],
    );
    expect(rows).toEqual([{ message_id: a }]);
  });

  it('keeps attachments byte for byte (base64 in the row) and sends them with the stable Message-ID', async () => {
    const ics = 'BEGIN:VCALENDAR\r\nVERSION:2.0\r\nSUMMARY:Arrivée\r\nEND:VCALENDAR\r\n';
    const id = await t.dataSource.transaction((m) =>
      enqueueEmail(
        m,
        email({
          cc: ['copy@test.example'],
          headers: { 'X-Evalon-Loan': '42' },
          attachments: [{ filename: 'loan.ics', contentType: 'text/calendar', content: ics }],
        }),
      ),
    );
    const [row] = await t.dataSource.query(
      'SELECT attachments FROM outbox_messages WHERE message_id = ?',
      [id],
    );
    expect(jsonColumn(row.attachments)).toEqual([
      {
        filename: 'loan.ics',
        contentType: 'text/calendar',
        contentBase64: Buffer.from(ics, 'utf8').toString('base64'),
      },
    ]);
    const mailer = new RecordingMailer();
    await worker(mailer).drainOnce();
    expect(mailer.sent).toHaveLength(1);
    const sent = mailer.sent[0]!;
    expect(sent.messageId).toBe(`<${id}@evalon.example>`);
    expect(sent.cc).toEqual(['copy@test.example']);
    expect(sent.headers).toEqual({ 'Auto-Submitted': 'auto-generated', 'X-Evalon-Loan': '42' });
    expect((sent.attachments![0]!.content as Buffer).toString('utf8')).toBe(ics);
  });

  it('refuses header injection and headers the worker owns', async () => {
    await expect(
      t.dataSource.transaction((m) =>
        enqueueEmail(m, email({ subject: 'Hello\r\nBcc: someone@test.example' })),
      ),
    ).rejects.toThrow();
    await expect(
      t.dataSource.transaction((m) =>
        enqueueEmail(m, email({ headers: { 'Message-ID': '<forged@test.example>' } })),
      ),
    ).rejects.toThrow();
  });
});

describe('the worker', () => {
  it('two workers on two connection pools drain 50 messages: each sent exactly once', async () => {
    const ids: string[] = [];
    for (let i = 0; i < 50; i++) {
      ids.push(await t.dataSource.transaction((m) => enqueueEmail(m, email())));
    }
    // A second data source stands for a second server process.
    const other: DataSource = createDataSource(t.config.db);
    await other.initialize();
    const jitter = () => Math.floor(Math.random() * 5);
    const mailA = new RecordingMailer(jitter);
    const mailB = new RecordingMailer(jitter);
    const a = worker(mailA, { batchSize: 5 }, { workerId: 'worker-a' });
    const b = worker(mailB, { batchSize: 5 }, { workerId: 'worker-b', dataSource: other });
    try {
      a.start();
      b.start();
      await waitUntil(async () => {
        const [r] = await t.dataSource.query(
          "SELECT COUNT(*) AS n FROM outbox_messages WHERE status = 'sent'",
        );
        return Number(r.n) === 50;
      });
    } finally {
      await Promise.all([a.stop(), b.stop()]);
      await other.destroy();
    }
    const counts = new Map<string, number>();
    for (const m of [...mailA.sent, ...mailB.sent]) {
      counts.set(m.messageId!, (counts.get(m.messageId!) ?? 0) + 1);
    }
    expect(counts.size).toBe(50);
    expect([...counts.values()].every((n) => n === 1)).toBe(true);
    expect([...counts.keys()].sort()).toEqual(ids.map((id) => `<${id}@evalon.example>`).sort());
    // Both took part (each claims 5 at a time, so one cannot take all 50 in one go).
    expect(mailA.sent.length).toBeGreaterThan(0);
    expect(mailB.sent.length).toBeGreaterThan(0);
    process.stdout.write(
      `outbox concurrency: worker-a sent ${mailA.sent.length}, worker-b sent ${mailB.sent.length}\n`,
    );
    const rows = await t.dataSource.query(
      'SELECT status, attempts, locked_by FROM outbox_messages',
    );
    expect(rows).toHaveLength(50);
    expect(
      rows.every(
        (r: { status: string; attempts: number; locked_by: string | null }) =>
          r.status === 'sent' && r.attempts === 1 && r.locked_by === null,
      ),
    ).toBe(true);
  });

  it('retries with exponential backoff, parks after the last attempt, and an admin can resend it', async () => {
    const start = new Date(Date.now() + 1_000);
    let clock = start;
    const id = await t.dataSource.transaction((m) => enqueueEmail(m, email(), start));
    const down = new DownMailer();
    // random() = 0.5: delay = ceiling/2 + 0.5·ceiling/2 = 0.75·ceiling; ceiling 2 s, then 4 s.
    const w = worker(
      down,
      { maxAttempts: 3, backoffBaseMs: 2_000, backoffCapMs: 900_000 },
      { now: () => clock, random: () => 0.5 },
    );

    expect(await w.drainOnce()).toMatchObject({ claimed: 1, retried: 1 });
    let row = await rowOf(id);
    expect(row).toMatchObject({ status: 'pending', attempts: 1, locked_by: null });
    expect(row.last_error).toContain('ECONNREFUSED');
    expect(new Date(row.next_attempt_at).getTime() - start.getTime()).toBe(1_500);

    clock = new Date(start.getTime() + 1_499);
    expect(await w.drainOnce()).toMatchObject({ claimed: 0 });
    clock = new Date(start.getTime() + 1_500);
    expect(await w.drainOnce()).toMatchObject({ claimed: 1, retried: 1 });
    row = await rowOf(id);
    expect(row.attempts).toBe(2);
    expect(new Date(row.next_attempt_at).getTime() - clock.getTime()).toBe(3_000);

    clock = new Date(start.getTime() + 4_500);
    expect(await w.drainOnce()).toMatchObject({ claimed: 1, parked: 1 });
    row = await rowOf(id);
    expect(row).toMatchObject({ status: 'parked', attempts: 3, locked_by: null });
    expect(down.calls).toBe(3);
    clock = new Date(start.getTime() + 3_600_000);
    expect(await w.drainOnce()).toMatchObject({ claimed: 0 });

    // The platform admin sees it among the parked and sends it again.
    const platform = await makeOrganisation(t.dataSource, 'platform');
    const admin = await makePerson(t.dataSource, platform.id, 'admin');
    const client = await signedInClient(t.app, admin.email, admin.password);
    const list = await client.agent.get('/api/admin/outbox?status=parked').expect(200);
    const listed = (list.body.items as { id: number; messageId: string }[]).find(
      (m) => m.messageId === id,
    );
    expect(listed).toMatchObject({ status: 'parked', attempts: 3, subject: email().subject });
    expect(listed).not.toHaveProperty('html');
    const resent = await client.agent
      .post(`/api/admin/outbox/${row.id}/resend`)
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(200);
    expect(resent.body.message).toMatchObject({ messageId: id, status: 'pending', attempts: 0 });
    const audit = await t.dataSource.query(
      "SELECT actor_user_id, detail FROM audit_events WHERE action = 'outbox.resent' AND subject = ?",
      [`outbox_message:${row.id}`],
    );
    expect(audit).toHaveLength(1);
    expect(audit[0].actor_user_id).toBe(admin.userId);
    expect(jsonColumn(audit[0].detail)).toMatchObject({ messageId: id, attempts: 3 });
    const twice = await client.agent
      .post(`/api/admin/outbox/${row.id}/resend`)
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(409);
    expect(twice.body.error.code).toBe('not_parked');

    // Now the mail server is back: it goes, under the same Message-ID, and only once.
    const mailer = new RecordingMailer();
    const w2 = worker(mailer, {}, { now: () => new Date(Date.now() + 1_000) });
    expect(await w2.drainOnce()).toMatchObject({ claimed: 1, sent: 1 });
    expect(await w2.drainOnce()).toMatchObject({ claimed: 0 });
    expect(mailer.sent.map((m) => m.messageId)).toEqual([`<${id}@evalon.example>`]);
    expect(await rowOf(id)).toMatchObject({ status: 'sent', attempts: 1 });
  });

  it('parks at once when the mail server refuses for good (5yz)', async () => {
    const id = await t.dataSource.transaction((m) => enqueueEmail(m, email()));
    const refusing: Mailer = {
      send: async () => {
        throw Object.assign(new Error('550 5.1.1 mailbox unavailable'), { responseCode: 550 });
      },
    };
    expect(await worker(refusing).drainOnce()).toMatchObject({ claimed: 1, parked: 1 });
    const row = await rowOf(id);
    expect(row).toMatchObject({ status: 'parked', attempts: 1 });
    expect(row.last_error).toMatch(/^Refused for good: SMTP 550/);
  });

  it('reclaims a sending row whose worker died (lease over), leaves a live lease alone, parks one with no attempts left', async () => {
    const [dead, live, exhausted] = await Promise.all(
      [0, 1, 2].map(() => t.dataSource.transaction((m) => enqueueEmail(m, email()))),
    );
    const past = new Date(Date.now() - 60_000);
    const future = new Date(Date.now() + 60_000);
    const lease =
      'UPDATE outbox_messages SET status = ?, locked_by = ?, locked_until = ?, attempts = ? WHERE message_id = ?';
    await t.dataSource.query(lease, ['sending', 'dead-worker', past, 1, dead]);
    await t.dataSource.query(lease, ['sending', 'live-worker', future, 1, live]);
    await t.dataSource.query(lease, ['sending', 'dead-worker', past, 3, exhausted]);

    const mailer = new RecordingMailer();
    const result = await worker(mailer, { maxAttempts: 3 }).drainOnce();
    expect(result).toMatchObject({ claimed: 2, sent: 1, parked: 1 });
    expect(mailer.sent.map((m) => m.messageId)).toEqual([`<${dead}@evalon.example>`]);
    expect(await rowOf(dead!)).toMatchObject({ status: 'sent', attempts: 2, locked_by: null });
    expect(await rowOf(live!)).toMatchObject({ status: 'sending', locked_by: 'live-worker' });
    const parked = await rowOf(exhausted!);
    expect(parked.status).toBe('parked');
    expect(parked.last_error).toContain('dead-worker');
  });

  it('never sends a row that is already marked sent', async () => {
    const id = await t.dataSource.transaction((m) => enqueueEmail(m, email()));
    await t.dataSource.query(
      "UPDATE outbox_messages SET status = 'sent', sent_at = ? WHERE message_id = ?",
      [new Date(), id],
    );
    const mailer = new RecordingMailer();
    expect(await worker(mailer).drainOnce()).toMatchObject({ claimed: 0 });
    expect(mailer.sent).toHaveLength(0);
  });

  it('on stop, finishes the message in flight and hands the rest of its batch back untried', async () => {
    const ids = [];
    for (let i = 0; i < 3; i++)
      ids.push(await t.dataSource.transaction((m) => enqueueEmail(m, email())));
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    let entered!: () => void;
    const inFlight = new Promise<void>((r) => (entered = r));
    const sent: MailMessage[] = [];
    const slow: Mailer = {
      send: async (message) => {
        entered();
        await gate;
        sent.push(message);
      },
    };
    const w = worker(slow, { batchSize: 3 });
    w.start();
    await inFlight;
    const stopped = w.stop();
    release();
    await stopped;
    expect(sent.map((m) => m.messageId)).toEqual([`<${ids[0]}@evalon.example>`]);
    expect(await rowOf(ids[0]!)).toMatchObject({ status: 'sent' });
    for (const id of ids.slice(1)) {
      expect(await rowOf(id)).toMatchObject({ status: 'pending', attempts: 0, locked_by: null });
    }
  });

  it('wakes at once when a transaction that enqueued commits, without waiting for the poll', async () => {
    const mailer = new RecordingMailer();
    // A poll interval of a minute: only the in-process nudge can deliver within the test.
    const w = worker(mailer, { pollIntervalMs: 60_000 });
    w.start();
    try {
      await new Promise((r) => setTimeout(r, 100)); // let the first (empty) pass go to sleep
      const to = `nudged.${unique()}@test.example`;
      const started = Date.now();
      await t.dataSource.transaction((m) => enqueueEmail(m, email({ to })));
      await mailer.waitFor(to, 1, 2_000);
      expect(Date.now() - started).toBeLessThan(2_000);
    } finally {
      await w.stop();
    }
  });
});

describe('identity e-mail goes through the outbox', () => {
  it('an invitation is an outbox row of the same transaction, sent by the worker; a refused one leaves none', async () => {
    const org = await makeOrganisation(t.dataSource, 'hospital');
    const buyer = await makePerson(t.dataSource, org.id, 'buyer');
    const client = await signedInClient(t.app, buyer.email, buyer.password);
    const to = `outbox.invitee.${unique()}@test.example`;
    await client.agent
      .post(`/api/organisations/${org.id}/invitations`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: to, name: 'Outbox Invitee', role: 'clinician' })
      .expect(201);
    // No worker runs in this app: the e-mail waits in the outbox.
    expect(t.mail.sent).toHaveLength(0);
    const rows = await t.dataSource.query(
      'SELECT message_id, subject, status FROM outbox_messages WHERE JSON_CONTAINS(to_addresses, JSON_QUOTE(?))',
      [to],
    );
    expect(rows).toEqual([
      {
        message_id: expect.stringMatching(uuidV4),
        subject: `You are invited to join ${org.name} on Evalon`,
        status: 'pending',
      },
    ]);
    const mailer = new RecordingMailer();
    await worker(mailer).drainOnce();
    const sent = await mailer.waitFor(to);
    expect(sent.messageId).toBe(`<${rows[0].message_id}@evalon.example>`);
    expect(sent.text).toContain(`${t.config.http.publicUrl}/accept-invitation?token=`);

    // A refused invitation (a role the buyer may not hand out) rolls back: no e-mail row.
    const refused = `outbox.refused.${unique()}@test.example`;
    await client.agent
      .post(`/api/organisations/${org.id}/invitations`)
      .set('X-XSRF-TOKEN', client.csrf)
      .send({ email: refused, name: 'Nobody', role: 'fleet_manager' })
      .expect(422);
    const none = await t.dataSource.query(
      'SELECT COUNT(*) AS n FROM outbox_messages WHERE JSON_CONTAINS(to_addresses, JSON_QUOTE(?))',
      [refused],
    );
    expect(Number(none[0].n)).toBe(0);
  });

  it('only the platform admin may read the outbox', async () => {
    const org = await makeOrganisation(t.dataSource, 'hospital');
    const buyer = await makePerson(t.dataSource, org.id, 'buyer');
    const client = await signedInClient(t.app, buyer.email, buyer.password);
    await client.agent.get('/api/admin/outbox').expect(403);
    await client.agent
      .post(`/api/admin/outbox/1/resend`)
      .set('X-XSRF-TOKEN', client.csrf)
      .expect(403);
    const platform = await makeOrganisation(t.dataSource, 'platform');
    const admin = await makePerson(t.dataSource, platform.id, 'admin');
    const adminClient = await signedInClient(t.app, admin.email, admin.password);
    const missing = await adminClient.agent
      .post(`/api/admin/outbox/999999999/resend`)
      .set('X-XSRF-TOKEN', adminClient.csrf)
      .expect(404);
    expect(missing.body.error.code).toBe('outbox_message_not_found');
    await adminClient.agent.get('/api/admin/outbox?status=nonsense').expect(400);
    const pending = await t.dataSource.transaction((m) => enqueueEmail(m, email()));
    const list = await adminClient.agent.get('/api/admin/outbox?status=pending').expect(200);
    expect(list.body.items.map((m: { messageId: string }) => m.messageId)).toContain(pending);
  });
});
