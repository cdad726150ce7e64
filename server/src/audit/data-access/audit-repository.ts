import type { EntityManager } from 'typeorm';
import type { AuditEvent } from '@evalon/contracts';
import { AuditEventEntity, type AuditEventRow } from './entities';

/** What to record; `at` defaults to now. */
export interface NewAuditEvent {
  actorUserId: number | null;
  organisationId: number | null;
  action: string;
  subject: string;
  detail?: Record<string, unknown> | null;
  requestId?: string | null;
  at?: Date;
}

/** Writes one audit event with the caller's manager, i.e. inside the caller's transaction. */
export async function insertAuditEvent(
  manager: EntityManager,
  event: NewAuditEvent,
): Promise<number> {
  const result = await manager.insert(AuditEventEntity, {
    at: event.at ?? new Date(),
    actorUserId: event.actorUserId,
    organisationId: event.organisationId,
    action: event.action,
    subject: event.subject,
    // TypeORM's deep-partial type does not accept an open record for a JSON column.
    detail: (event.detail ?? null) as never,
    requestId: event.requestId ?? null,
  });
  return Number(result.identifiers[0]?.id);
}

/** Filter for reading the trail, newest first. */
export interface AuditFilter {
  organisationId?: number;
  before?: number;
  limit: number;
}

function toAuditEvent(row: AuditEventRow): AuditEvent {
  return {
    id: row.id,
    at: row.at.toISOString(),
    actorUserId: row.actorUserId,
    organisationId: row.organisationId,
    action: row.action,
    subject: row.subject,
    ...(row.detail ? { detail: row.detail } : {}),
  };
}

/** Reads audit events, newest first, optionally for one organisation and before an id. */
export async function findAuditEvents(
  manager: EntityManager,
  filter: AuditFilter,
): Promise<AuditEvent[]> {
  const qb = manager
    .createQueryBuilder(AuditEventEntity, 'e')
    .orderBy('e.id', 'DESC')
    .limit(filter.limit);
  if (filter.organisationId !== undefined)
    qb.andWhere('e.organisationId = :org', { org: filter.organisationId });
  if (filter.before !== undefined) qb.andWhere('e.id < :before', { before: filter.before });
  const rows = await qb.getMany();
  return rows.map(toAuditEvent);
}
