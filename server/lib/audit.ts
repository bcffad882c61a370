import { AuditEvent } from '../db/models/index.ts';

export interface AuditInput {
  labId: string | null;
  actorId: string | null;
  action: string;
  targetType?: string;
  targetId?: string;
  details?: Record<string, unknown>;
  ip?: string | null;
}

/** Appends one event to the audit trail (the table rejects updates and deletes; see migration 0001). */
export async function recordAudit(event: AuditInput): Promise<void> {
  await AuditEvent.create({
    labId: event.labId,
    actorId: event.actorId,
    action: event.action,
    targetType: event.targetType ?? null,
    targetId: event.targetId ?? null,
    details: event.details ?? {},
    ip: event.ip ?? null,
  });
}
