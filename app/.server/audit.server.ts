import type { Transaction } from "sequelize";
import { AuditEntry } from "./db/models.server";

export interface AuditInput {
  actorId: number | null;
  action: string;
  entityType: string;
  entityId: string | number | null;
  before?: unknown;
  after?: unknown;
}

/** Records one change; pass the transaction of the change so both land or neither does. */
export function recordAudit(entry: AuditInput, transaction?: Transaction) {
  return AuditEntry.create(
    {
      actorId: entry.actorId,
      action: entry.action,
      entityType: entry.entityType,
      entityId: entry.entityId === null ? null : String(entry.entityId),
      before: entry.before ?? null,
      after: entry.after ?? null,
    },
    { transaction },
  );
}
