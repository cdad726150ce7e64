import type { EntityManager } from 'typeorm';
import { addCalendarDays } from '@evalon/scheduling';
import type { Logger } from '../../logger';
import type { DataSource } from 'typeorm';
import { claimExpiringCredentials, markCredentialWarned } from '../data-access/proctor-repository';
import type { ProctorCredentialRow } from '../data-access/entities';
import { credentialWarningDays } from './profile';

/**
 * Called inside the transaction that marks a credential as warned about, so the e-mail and the
 * in-app notice commit with the mark (the notifications component renders them).
 */
export type NotifyCredentialExpiring = (
  manager: EntityManager,
  credential: ProctorCredentialRow,
) => Promise<unknown>;

/**
 * Warns proctors once about each credential that ends within {@link credentialWarningDays} days
 * (today in UTC; a day either way does not matter 60 days ahead). Credentials are claimed with
 * `FOR UPDATE SKIP LOCKED`, so several processes can run it. Returns how many were warned.
 */
export async function runCredentialWarnings(
  deps: { dataSource: DataSource; now: () => Date; notify: NotifyCredentialExpiring },
  batch = 50,
): Promise<number> {
  const today = deps.now().toISOString().slice(0, 10);
  const until = addCalendarDays(today, credentialWarningDays);
  let warned = 0;
  for (;;) {
    const n = await deps.dataSource.transaction(async (m) => {
      const due = await claimExpiringCredentials(m, today, until, batch);
      for (const c of due) {
        await deps.notify(m, c);
        await markCredentialWarned(m, c.id, deps.now());
      }
      return due.length;
    });
    warned += n;
    if (n < batch) return warned;
  }
}

/** Runs {@link runCredentialWarnings} every `intervalMs` until stopped. */
export function startCredentialWarningJob(
  deps: {
    dataSource: DataSource;
    now: () => Date;
    notify: NotifyCredentialExpiring;
    logger: Logger;
  },
  intervalMs = 3_600_000,
): { stop(): Promise<void> } {
  let running: Promise<unknown> = Promise.resolve();
  const tick = () => {
    running = runCredentialWarnings(deps).catch((err: unknown) =>
      deps.logger.error({ err }, 'credential warning job failed'),
    );
  };
  tick();
  const timer = setInterval(tick, intervalMs);
  timer.unref();
  return {
    async stop() {
      clearInterval(timer);
      await running;
    },
  };
}
