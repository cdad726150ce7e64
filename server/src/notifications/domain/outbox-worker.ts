import { randomBytes } from 'node:crypto';
import { hostname } from 'node:os';
import type { DataSource } from 'typeorm';
import type { Config } from '../../config';
import type { Logger } from '../../logger';
import { retryDelayMs } from './backoff';
import { claimDue, markFailed, markSent, releaseClaimed } from '../data-access/outbox-repository';
import type { OutboxMessageRow } from '../data-access/entities';
import type { MailMessage, Mailer } from './mailer';
import type { NotifyLoanEvent } from '../../loans';
import { renderDueNotices } from './notice-jobs';
import { onOutboxEnqueued } from './outbox';

/** What a worker needs. */
export interface OutboxWorkerOptions {
  dataSource: DataSource;
  /** The transport (SMTP in the server, a recording mailer in tests). */
  mailer: Mailer;
  logger: Logger;
  settings: Config['outbox'];
  /** Domain of Message-IDs, `<uuid@domain>`; see {@link messageIdDomain}. */
  messageIdDomain: string;
  /** Name in `locked_by`; host, process id and a random part by default. */
  workerId?: string;
  /** The clock (tests pass their own to step through backoff). */
  now?: () => Date;
  /** Jitter source in [0, 1). */
  random?: () => number;
  /**
   * Renders deferred loan notices (`notice_jobs`) into e-mails and notifications before each
   * pass; without it the worker only sends.
   */
  renderLoan?: NotifyLoanEvent;
}

/** What one pass over the outbox did. */
export interface DrainResult {
  claimed: number;
  sent: number;
  /** Failed and scheduled for another attempt. */
  retried: number;
  /** Parked (attempts used up, a permanent SMTP refusal, or reclaimed with none left). */
  parked: number;
  /** Handed back untried (shutdown, or not enough lease left). */
  released: number;
}

/** The Message-ID domain for a From address such as `Evalon <no-reply@evalon.example>`. */
export function messageIdDomain(from: string): string {
  const match = /@([A-Za-z0-9.-]+)>?\s*$/.exec(from.trim());
  return match?.[1]?.toLowerCase() ?? 'evalon.example';
}

/** The Message-ID header of an outbox row: the same on every attempt. */
export function messageIdHeader(messageId: string, domain: string): string {
  return `<${messageId}@${domain}>`;
}

/** A readable one-line reason from a transport error. */
function describeError(err: unknown): string {
  const e = err as { message?: unknown; code?: unknown; responseCode?: unknown };
  const parts = [
    typeof e?.code === 'string' ? e.code : null,
    typeof e?.responseCode === 'number' ? `SMTP ${e.responseCode}` : null,
    typeof e?.message === 'string' ? e.message : String(err),
  ].filter(Boolean);
  return parts.join(': ').replace(/\s+/g, ' ').slice(0, 2000);
}

/**
 * Whether the mail server refused for good: a 5yz reply is a permanent negative completion
 * (RFC 5321 §4.2.1), so retrying the same message cannot help; an admin looks at it instead.
 */
function isPermanentRefusal(err: unknown): boolean {
  const code = (err as { responseCode?: unknown })?.responseCode;
  return typeof code === 'number' && code >= 500 && code < 600;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * Drains the e-mail outbox. Each pass claims a batch in a short transaction (`FOR UPDATE SKIP
 * LOCKED`, status `sending`, a lease), sends each message OUTSIDE any transaction, then marks it
 * `sent` or schedules a retry with exponential backoff and jitter; after `maxAttempts` it parks
 * the message. Rows of a worker that died are reclaimed when their lease runs out. Several
 * workers, in one process or many, can run at once: a row is claimed by one of them at a time.
 *
 * Delivery is at least once, not exactly once: if the process dies after the mail server
 * accepted a message but before `sent` is written, the message goes again after the lease, with
 * the same Message-ID (docs/decisions/0003-outbox.md).
 */
export class OutboxWorker {
  /** This worker's name in `locked_by`. */
  readonly id: string;
  private readonly now: () => Date;
  private readonly random: () => number;
  private running: Promise<void> | null = null;
  private stopping = false;
  private wakeRequested = false;
  private wakeSleeper: (() => void) | null = null;
  private unsubscribe: (() => void) | null = null;

  constructor(private readonly options: OutboxWorkerOptions) {
    this.id =
      options.workerId ??
      `${hostname()}:${process.pid}:${randomBytes(3).toString('hex')}`.slice(0, 100);
    this.now = options.now ?? (() => new Date());
    this.random = options.random ?? Math.random;
  }

  /** Starts the polling loop (idempotent). */
  start(): void {
    if (this.running) return;
    this.stopping = false;
    this.unsubscribe = onOutboxEnqueued(() => this.wake());
    this.running = this.loop();
  }

  /**
   * Stops after the message being sent now (if any); the rest of its batch is handed back.
   * Resolves when the loop has ended.
   */
  async stop(): Promise<void> {
    this.stopping = true;
    this.unsubscribe?.();
    this.unsubscribe = null;
    this.wake();
    await this.running;
    this.running = null;
  }

  /** Asks the loop to look at the outbox now instead of at the next poll. */
  wake(): void {
    this.wakeRequested = true;
    this.wakeSleeper?.();
  }

  private async loop(): Promise<void> {
    const { settings, logger } = this.options;
    let dbFailures = 0;
    while (!this.stopping) {
      // A destroyed data source does not come back: nothing left to drain with.
      if (!this.options.dataSource.isInitialized) {
        logger.warn({ worker: this.id }, 'outbox worker ends: its data source was closed');
        break;
      }
      this.wakeRequested = false;
      let result: DrainResult | null = null;
      try {
        result = await this.drainOnce();
        dbFailures = 0;
      } catch (err) {
        dbFailures += 1;
        logger.warn({ err, worker: this.id }, 'outbox pass failed; trying again');
      }
      if (this.stopping) break;
      // A full batch means more may be due: go on at once. So does a nudge during the pass.
      if (result && result.claimed >= settings.batchSize) continue;
      if (this.wakeRequested && !dbFailures) continue;
      // While the database is away, wait longer between passes (up to 30 s) instead of spinning.
      const pause = dbFailures
        ? Math.min(30_000, settings.pollIntervalMs * 2 ** Math.min(dbFailures, 6))
        : settings.pollIntervalMs;
      await new Promise<void>((resolve) => {
        // Unreferenced: a sleeping worker alone does not keep the process alive.
        const timer = setTimeout(done, pause);
        timer.unref();
        function done() {
          clearTimeout(timer);
          resolve();
        }
        this.wakeSleeper = done;
        if (this.stopping || (this.wakeRequested && !dbFailures)) done();
      });
      this.wakeSleeper = null;
    }
  }

  /**
   * One pass: claims a batch and sends it. Tests call this directly to step the worker; the
   * loop calls it after every poll or nudge.
   */
  async drainOnce(): Promise<DrainResult> {
    const { dataSource, settings, logger, renderLoan } = this.options;
    // Deferred notices first: what they render is enqueued (and nudges this worker) at once.
    if (renderLoan && !this.stopping) {
      await renderDueNotices(dataSource, {
        renderLoan,
        now: this.now,
        logger,
        batchSize: settings.batchSize,
        maxAttempts: settings.maxAttempts,
        backoff: { baseMs: settings.backoffBaseMs, capMs: settings.backoffCapMs },
        random: this.random,
      });
    }
    const claim = await claimDue(dataSource, {
      workerId: this.id,
      now: this.now(),
      leaseMs: settings.leaseMs,
      batchSize: settings.batchSize,
      maxAttempts: settings.maxAttempts,
    });
    const result: DrainResult = {
      claimed: claim.claimed.length + claim.parkedIds.length,
      sent: 0,
      retried: 0,
      parked: claim.parkedIds.length,
      released: 0,
    };
    for (const id of claim.parkedIds) {
      logger.error({ outboxId: id, worker: this.id }, 'outbox message parked after a worker died');
    }
    const rows = claim.claimed;
    for (let i = 0; i < rows.length; i++) {
      const row = rows[i]!;
      // Hand back what is left when stopping, or when the lease could run out during the next
      // exchange (another worker would then reclaim and send it a second time).
      const leaseLeft = (row.lockedUntil?.getTime() ?? 0) - this.now().getTime();
      if (this.stopping || leaseLeft < 3 * settings.smtpTimeoutMs) {
        const rest = rows.slice(i).map((r) => r.id);
        await releaseClaimed(dataSource, rest, this.id);
        result.released += rest.length;
        break;
      }
      const outcome = await this.sendOne(row);
      result[outcome] += 1;
    }
    return result;
  }

  private async sendOne(row: OutboxMessageRow): Promise<'sent' | 'retried' | 'parked'> {
    const { dataSource, mailer, logger, settings } = this.options;
    const log = { outboxId: row.id, messageId: row.messageId, attempt: row.attempts };
    try {
      await mailer.send(this.toMail(row));
    } catch (err) {
      const permanent = isPermanentRefusal(err);
      const park = permanent || row.attempts >= settings.maxAttempts;
      const delay = retryDelayMs(
        row.attempts,
        { baseMs: settings.backoffBaseMs, capMs: settings.backoffCapMs },
        this.random,
      );
      const error = `${permanent ? 'Refused for good: ' : ''}${describeError(err)}`;
      await markFailed(dataSource, row, this.id, {
        park,
        nextAttemptAt: new Date(this.now().getTime() + (park ? 0 : delay)),
        error,
      });
      if (park) logger.error({ ...log, err }, 'outbox message parked');
      else logger.warn({ ...log, err, retryInMs: delay }, 'outbox message not sent; will retry');
      return park ? 'parked' : 'retried';
    }
    // The mail server has it. Recording that is what keeps it from going twice, so a database
    // hiccup here is retried briefly before the lease is left to expire.
    for (let attempt = 0; ; attempt++) {
      try {
        await markSent(dataSource, row.id, this.now());
        break;
      } catch (err) {
        if (attempt >= 3) {
          logger.error(
            { ...log, err },
            'outbox message sent but not marked; it will go again with the same Message-ID',
          );
          break;
        }
        await sleep(250 * 4 ** attempt);
      }
    }
    logger.debug(log, 'outbox message sent');
    return 'sent';
  }

  private toMail(row: OutboxMessageRow): MailMessage {
    return {
      to: row.to,
      ...(row.cc && row.cc.length > 0 ? { cc: row.cc } : {}),
      subject: row.subject,
      html: row.html,
      text: row.text,
      messageId: messageIdHeader(row.messageId, this.options.messageIdDomain),
      // RFC 3834 §5: automatic messages say so, which keeps auto-replies from answering them.
      headers: { 'Auto-Submitted': 'auto-generated', ...(row.headers ?? {}) },
      ...(row.attachments && row.attachments.length > 0
        ? {
            attachments: row.attachments.map((a) => ({
              filename: a.filename,
              contentType: a.contentType,
              content: Buffer.from(a.contentBase64, 'base64'),
            })),
          }
        : {}),
    };
  }
}

/** Builds a worker from the server configuration. */
export function createOutboxWorker(
  config: Pick<Config, 'outbox' | 'smtp'>,
  deps: Pick<
    OutboxWorkerOptions,
    'dataSource' | 'mailer' | 'logger' | 'now' | 'workerId' | 'renderLoan'
  >,
): OutboxWorker {
  return new OutboxWorker({
    ...deps,
    settings: config.outbox,
    messageIdDomain: messageIdDomain(config.smtp.from),
  });
}
