import type { DataSource } from 'typeorm';
import type { LoanEventNotice, NotifyLoanEvent } from '../../loans';
import type { Logger } from '../../logger';
import {
  claimDueNoticeJob,
  deleteNoticeJob,
  insertNoticeJob,
  markNoticeJobFailed,
} from '../data-access/notice-job-repository';
import { retryDelayMs, type BackoffSettings } from './backoff';
import { nudgeAfterCommit } from './outbox';

/**
 * A loan notifier that renders nothing inside the caller's transaction: it records the notice
 * as a `notice_jobs` row (one short INSERT) that commits or rolls back with the loan change, and
 * the outbox worker renders the e-mails, calendar invites and in-app notifications afterwards
 * with `render` (the ordinary loan notifier). Rendering an invite and three e-mails costs CPU
 * and a dozen queries; a payment webhook holding the loan's row lock meanwhile made every other
 * delivery wait (docs/benchmarks.md, webhooks).
 */
export function deferredLoanNotifier(now: () => Date = () => new Date()): NotifyLoanEvent {
  return async (m, notice) => {
    const payload: LoanEventNotice = {
      loanId: notice.loanId,
      event: notice.event,
      ...(notice.actorUserId !== undefined ? { actorUserId: notice.actorUserId } : {}),
      ...(notice.reason !== undefined ? { reason: notice.reason } : {}),
    };
    await insertNoticeJob(
      m,
      {
        kind: 'loan',
        payload: payload as unknown as Record<string, unknown>,
        dedupeKey: `loan:${notice.loanId}:${notice.event}`,
      },
      now(),
    );
    // Wakes this process's outbox worker after COMMIT, as an enqueued e-mail does.
    nudgeAfterCommit(m);
  };
}

/** Settings of {@link renderDueNotices}. */
export interface RenderNoticesOptions {
  /** The renderer of `loan` jobs: the loan notifier that writes e-mails and notifications. */
  renderLoan: NotifyLoanEvent;
  now: () => Date;
  logger: Logger;
  /** Jobs per call at most. */
  batchSize: number;
  /** Failed renderings before a job is parked. */
  maxAttempts: number;
  backoff: BackoffSettings;
  random?: () => number;
}

/**
 * Renders due jobs, each in its own transaction: claim (`FOR UPDATE SKIP LOCKED`), render (the
 * e-mails go into the outbox with their dedupe keys, the notifications are written), delete the
 * job, commit. A crash before the commit leaves the job as it was; a crash after leaves the
 * messages; either way each message exists once. A failed rendering rolls back and is retried
 * with backoff, then parked.
 *
 * @returns How many jobs were rendered.
 */
export async function renderDueNotices(
  dataSource: DataSource,
  o: RenderNoticesOptions,
): Promise<number> {
  let rendered = 0;
  for (let i = 0; i < o.batchSize; i++) {
    let failed: { id: number; attempts: number; err: unknown } | null = null;
    const done = await dataSource.transaction('READ COMMITTED', async (m) => {
      const job = await claimDueNoticeJob(m, o.now());
      if (!job) return false;
      try {
        // A savepoint, so a failed rendering undoes only its own writes and the claim stays.
        await m.transaction(async (inner) => {
          await o.renderLoan(inner, job.payload as unknown as LoanEventNotice);
        });
      } catch (err) {
        failed = { id: job.id, attempts: job.attempts + 1, err };
        return true;
      }
      await deleteNoticeJob(m, job.id);
      return true;
    });
    if (!done) break;
    if (failed) {
      const f: { id: number; attempts: number; err: unknown } = failed;
      const park = f.attempts >= o.maxAttempts;
      const delay = retryDelayMs(f.attempts, o.backoff, o.random);
      await markNoticeJobFailed(dataSource, f.id, {
        park,
        nextAttemptAt: new Date(o.now().getTime() + (park ? 0 : delay)),
        error: String((f.err as Error)?.message ?? f.err),
      });
      o.logger[park ? 'error' : 'warn'](
        { err: f.err, noticeJobId: f.id, attempt: f.attempts },
        park ? 'notice job parked' : 'notice job not rendered; will retry',
      );
      continue;
    }
    rendered += 1;
  }
  return rendered;
}
