import "server-only";
import type { Knex } from "knex";
import { db } from "@/lib/db/knex";

export type AuditEntry = {
  groupId: number | null;
  userId: string | null;
  /** dotted verb, e.g. "site.create" */
  action: string;
  entityType: string;
  entityId: string | number;
  detail?: Record<string, unknown> | null;
};

/** Appends one entry to the audit log; pass the transaction that made the change. */
export async function recordAudit(entry: AuditEntry, trx: Knex | Knex.Transaction = db): Promise<void> {
  await trx("audit_log").insert({
    group_id: entry.groupId,
    user_id: entry.userId,
    action: entry.action,
    entity_type: entry.entityType,
    entity_id: String(entry.entityId),
    detail: entry.detail ? JSON.stringify(entry.detail) : null,
  });
}
