import type { DataSource } from 'typeorm';
import type { AuditEvent, AuditQuery } from '@evalon/contracts';
import { AppError } from '../../errors';
import { type AuthContext, managesOrganisation } from '../../identity';
import { findAuditEvents } from '../data-access/audit-repository';

export { insertAuditEvent, type NewAuditEvent } from '../data-access/audit-repository';

/**
 * Reads the audit trail. The platform admin sees any organisation (or all); a managing member
 * sees their own organisation only.
 */
export async function listAuditEvents(
  dataSource: DataSource,
  auth: AuthContext,
  query: AuditQuery,
): Promise<AuditEvent[]> {
  if (!auth.isPlatformAdmin) {
    if (query.organisationId === undefined || !managesOrganisation(auth, query.organisationId)) {
      throw AppError.forbidden(
        'forbidden',
        'You can read the audit trail of organisations you look after.',
      );
    }
  }
  return findAuditEvents(dataSource.manager, {
    organisationId: query.organisationId,
    before: query.before,
    limit: query.limit,
  });
}
