import { EntitySchema } from 'typeorm';
import { idColumn, instantColumn, refColumn } from '../../database/columns';

/** A row of `audit_events`: who did what, when, to what, in which organisation. */
export interface AuditEventRow {
  id: number;
  at: Date;
  actorUserId: number | null;
  organisationId: number | null;
  /** Dotted verb, e.g. `member.deactivated`. */
  action: string;
  /** What was acted on, e.g. `user:42`. */
  subject: string;
  detail: Record<string, unknown> | null;
  /** Request id of the HTTP request that caused it, for matching with the log. */
  requestId: string | null;
}

export const AuditEventEntity = new EntitySchema<AuditEventRow>({
  name: 'AuditEvent',
  tableName: 'audit_events',
  columns: {
    id: idColumn,
    at: instantColumn('at'),
    actorUserId: refColumn('actor_user_id', true),
    organisationId: refColumn('organisation_id', true),
    action: { type: 'varchar', length: 64 },
    subject: { type: 'varchar', length: 200 },
    detail: { type: 'json', nullable: true },
    requestId: { type: 'varchar', length: 64, name: 'request_id', nullable: true },
  },
  indices: [
    { name: 'ix_audit_events_actor', columns: ['actorUserId', 'id'] },
    { name: 'ix_audit_events_organisation', columns: ['organisationId', 'id'] },
  ],
});
