// Deferred loan notices (`notice_jobs`): a payment's confirmation records the notice in its own
// transaction and the outbox worker renders the e-mails and notifications afterwards. These
// checks are about the transactional-outbox guarantees (common practice, see
// docs/decisions/0003-outbox.md): nothing rendered for a rolled-back change, one job per event,
// each job rendered once even with two workers at once, a failing render undone and retried with
// backoff, then parked.
import type { DataSource } from 'typeorm';
import { loadConfig, type Config } from '../src/config';
import { createDataSource } from '../src/database/data-source';
import { createLogger } from '../src/logger';
import type { NotifyLoanEvent } from '../src/loans';
import {
  deferredLoanNotifier,
  enqueueEmail,
  loanNotifierFromConfig,
  renderDueNotices,
} from '../src/notifications';
import { countRows, makeHospital, makeLender, type TestHospital } from './helpers/catalog';
import { insertApprovedLoan } from './helpers/payments';

let config: Config;
let ds: DataSource;
const logger = createLogger('silent');
const backoff = { baseMs: 60_000, capMs: 600_000 };

beforeAll(async () => {
  config = loadConfig();
  ds = createDataSource(config.db);
  await ds.initialize();
});
afterAll(() => ds.destroy());

async function approvedLoans(n: number): Promise<{ ids: number[]; hospital: TestHospital }> {
  const lender = await makeLender(ds);
  const hospital = await makeHospital(ds);
  const ids: number[] = [];
  for (let i = 0; i < n; i++) ids.push((await insertApprovedLoan(ds, lender, hospital)).id);
  return { ids, hospital };
}

const jobsOf = (loanId: number) =>
  countRows(ds, 'notice_jobs', 'dedupe_key LIKE ?', [`loan:${loanId}:%`]);
const mailsOf = (loanId: number) =>
  countRows(ds, 'outbox_messages', 'dedupe_key LIKE ?', [`loan:${loanId}:%`]);

describe('deferred loan notices', () => {
  it('records nothing when the transaction that deferred the notice rolls back', async () => {
    const { ids } = await approvedLoans(1);
    const notify = deferredLoanNotifier();
    await expect(
      ds.transaction(async (m) => {
        await notify(m, { loanId: ids[0]!, event: 'approved' });
        throw new Error('the loan change failed');
      }),
    ).rejects.toThrow('the loan change failed');
    expect(await jobsOf(ids[0]!)).toBe(0);
  });

  it('keeps one job for an event deferred twice (a replayed delivery)', async () => {
    const { ids } = await approvedLoans(1);
    const notify = deferredLoanNotifier();
    for (let i = 0; i < 2; i++) {
      await ds.transaction((m) => notify(m, { loanId: ids[0]!, event: 'approved' }));
    }
    expect(await jobsOf(ids[0]!)).toBe(1);
    const [job] = await ds.query(
      'SELECT kind, payload, status FROM notice_jobs WHERE dedupe_key = ?',
      [`loan:${ids[0]}:approved`],
    );
    const payload = typeof job.payload === 'string' ? JSON.parse(job.payload) : job.payload;
    expect({ ...job, payload }).toEqual({
      kind: 'loan',
      payload: { loanId: ids[0], event: 'approved' },
      status: 'pending',
    });
  });

  it('renders each job once with two workers at the same time, e-mails and notifications', async () => {
    const { ids, hospital } = await approvedLoans(6);
    const notify = deferredLoanNotifier();
    for (const id of ids) await ds.transaction((m) => notify(m, { loanId: id, event: 'approved' }));
    const options = {
      renderLoan: loanNotifierFromConfig(config),
      now: () => new Date(),
      logger,
      batchSize: 100,
      maxAttempts: 3,
      backoff,
    };
    const [a, b] = await Promise.all([
      renderDueNotices(ds, options),
      renderDueNotices(ds, options),
    ]);
    // Other suites' jobs on this database may be rendered too: at least ours were.
    expect(a + b).toBeGreaterThanOrEqual(ids.length);
    for (const id of ids) {
      expect(await jobsOf(id)).toBe(0);
      // `approved` goes to the hospital's buyers: this hospital has one (helpers/catalog).
      expect(await mailsOf(id)).toBe(1);
      expect(
        await countRows(ds, 'notifications', 'user_id = ? AND dedupe_key = ?', [
          hospital.buyer.userId,
          `loan:${id}:approved`,
        ]),
      ).toBe(1);
    }
    // A second pass finds nothing of ours and writes nothing more.
    await renderDueNotices(ds, options);
    for (const id of ids) expect(await mailsOf(id)).toBe(1);
  });

  it('undoes a failing render, retries it after a backoff and parks it after the last attempt', async () => {
    const { ids } = await approvedLoans(1);
    const loanId = ids[0]!;
    await ds.transaction((m) => deferredLoanNotifier()(m, { loanId, event: 'approved' }));
    let calls = 0;
    // Writes an e-mail, then fails: the e-mail must not stay behind.
    const failing: NotifyLoanEvent = async (m, notice) => {
      if (notice.loanId !== loanId) return loanNotifierFromConfig(config)(m, notice);
      calls += 1;
      await enqueueEmail(m, {
        to: 'someone@hospital.example',
        subject: 'partial',
        html: '<p>partial</p>',
        text: 'partial',
        dedupeKey: `loan:${loanId}:approved:user:0`,
      });
      throw new Error('template failed');
    };
    let clock = Date.now();
    const options = {
      renderLoan: failing,
      now: () => new Date(clock),
      logger,
      batchSize: 100,
      maxAttempts: 2,
      backoff,
      random: () => 0,
    };
    await renderDueNotices(ds, options);
    expect(calls).toBe(1);
    expect(await mailsOf(loanId)).toBe(0);
    const [first] = await ds.query(
      'SELECT status, attempts, next_attempt_at AS next, last_error AS err FROM notice_jobs WHERE dedupe_key = ?',
      [`loan:${loanId}:approved`],
    );
    expect(first.status).toBe('pending');
    expect(first.attempts).toBe(1);
    expect(first.err).toBe('template failed');
    // Equal-jitter backoff with random() = 0 waits half the first ceiling: 30 s (backoff.ts).
    expect(new Date(first.next).getTime() - clock).toBe(30_000);

    // Not due yet: left alone.
    await renderDueNotices(ds, options);
    expect(calls).toBe(1);

    clock += 30_000;
    await renderDueNotices(ds, options);
    expect(calls).toBe(2);
    const [second] = await ds.query(
      'SELECT status, attempts FROM notice_jobs WHERE dedupe_key = ?',
      [`loan:${loanId}:approved`],
    );
    expect(second).toEqual({ status: 'parked', attempts: 2 });
    expect(await mailsOf(loanId)).toBe(0);
  });
});
