import { defaultDepositWindowMs } from '@evalon/deposits';
import type { DataSource } from 'typeorm';
import { insertAuditEvent } from '../audit';
import {
  insertMembership,
  insertToken,
  insertUser,
  updateUser,
  hashPassword,
  invitationLifetimeMs,
  newOneTimeToken,
} from '../identity';
import { insertOrganisation, insertSite } from '../organisations';
import { appTables } from '../database/data-source';
import { demoOrganisations, demoPassword } from './demo-data';
import { loadDemoCatalog, type DemoCatalogSummary } from './load-demo-catalog';
import { loadDemoProctoring } from './load-demo-proctors';

/** Whether the database holds no organisations and no people yet. */
export async function isDatabaseEmpty(dataSource: DataSource): Promise<boolean> {
  const rows: { n: number | string }[] = await dataSource.query(
    'SELECT (SELECT COUNT(*) FROM organisations) + (SELECT COUNT(*) FROM users) AS n',
  );
  return Number(rows[0]?.n ?? 0) === 0;
}

/** Empties every application table (not the migrations record) and restarts loan references. */
export async function truncateAppTables(dataSource: DataSource): Promise<void> {
  const runner = dataSource.createQueryRunner();
  await runner.connect();
  try {
    // Foreign-key checks are per connection, so everything runs on this one.
    await runner.query('SET FOREIGN_KEY_CHECKS = 0');
    for (const table of appTables) await runner.query(`TRUNCATE TABLE \`${table}\``);
    // With no loans left, references start again at EV-<year>-000001.
    await runner.query('ALTER SEQUENCE loan_reference_seq RESTART WITH 1');
  } finally {
    await runner.query('SET FOREIGN_KEY_CHECKS = 1').catch(() => undefined);
    await runner.release();
  }
}

/** What was loaded, for the CLI to report. */
export interface DemoSummary extends DemoCatalogSummary {
  /** Proctors with profiles, and visits. */
  proctors?: number;
  visits?: number;
  organisations: number;
  sites: number;
  people: number;
}

/**
 * Loads the invented demo scenario: in one transaction organisations with campuses and depots,
 * people with roles (password `evalon-demo`), one pending invitation and one deactivated
 * clinician so the members pages look lived-in; then the lender's catalogue, maintenance and
 * loans dated from `now` (see load-demo-catalog.ts). Refuses a database that is not empty.
 */
export async function loadDemoData(
  dataSource: DataSource,
  now = new Date(),
  depositWindowMs = defaultDepositWindowMs,
): Promise<DemoSummary> {
  if (!(await isDatabaseEmpty(dataSource))) {
    throw new Error(
      'The database already holds organisations or people; demo data loads only into an empty one.',
    );
  }
  const passwordHash = await hashPassword(demoPassword);
  const summary: DemoSummary = {
    organisations: 0,
    sites: 0,
    people: 0,
    models: 0,
    units: 0,
    maintenanceHolds: 0,
    loans: 0,
  };
  await dataSource.transaction(async (m) => {
    for (const org of demoOrganisations) {
      const organisationId = await insertOrganisation(
        m,
        { name: org.name, kind: org.kind, country: org.country },
        now,
      );
      summary.organisations++;
      for (const site of org.sites) {
        // The campus's ISO 3166-2 subdivision decides which licences cover a visit there.
        const subdivision = site.region ? `${site.country}-${site.region}` : null;
        await insertSite(m, { organisationId, ...site, subdivision }, now);
        summary.sites++;
      }
      let inviterId: number | null = null;
      for (const person of org.people) {
        const userId = await insertUser(
          m,
          {
            email: person.email,
            name: person.name,
            passwordHash: person.state === 'pending' ? null : passwordHash,
            active: person.state !== 'deactivated',
            timeZone: person.timeZone,
          },
          now,
        );
        summary.people++;
        const membershipId = await insertMembership(
          m,
          { userId, organisationId, role: person.role },
          now,
        );
        if (person.state === 'active') inviterId ??= userId;
        // What happened to this membership, as the audit trail records it for a real one.
        const audit = (action: string, detail: Record<string, unknown>) =>
          insertAuditEvent(m, {
            at: now,
            actorUserId: inviterId,
            organisationId,
            action,
            subject: `membership:${membershipId}`,
            detail,
          });
        if (person.state === 'pending') {
          // Nobody knows this token; a manager can send a fresh link from the members page.
          const { tokenHash } = newOneTimeToken();
          await insertToken(
            m,
            {
              userId,
              purpose: 'invitation',
              tokenHash,
              organisationId,
              createdByUserId: inviterId,
              expiresAt: new Date(now.getTime() + invitationLifetimeMs),
            },
            now,
          );
          await audit('member.invited', {
            email: person.email,
            role: person.role,
            userId,
            newAccount: true,
          });
        }
        if (person.state === 'deactivated') {
          const lastSeen = new Date(now.getTime() - 40 * 24 * 3_600_000);
          await updateUser(m, userId, { lastSignInAt: lastSeen }, now);
          await audit('member.deactivated', { userId, sessionsEnded: 0 });
        }
      }
    }
    await insertAuditEvent(m, {
      at: now,
      actorUserId: null,
      organisationId: null,
      action: 'demo.loaded',
      subject: 'demo data',
      detail: { ...summary },
    });
  });
  // The catalogue and loans go through the product's own use cases, each in its transaction.
  Object.assign(summary, await loadDemoCatalog(dataSource, now, depositWindowMs));
  Object.assign(summary, await loadDemoProctoring(dataSource, now, passwordHash));
  return summary;
}
