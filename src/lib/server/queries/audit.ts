import type { Knex } from 'knex';

export interface AuditEntry {
  actorId: number | null;
  action: string;
  entity: string;
  entityId: string | number;
  before?: unknown;
  after?: unknown;
  at?: Date;
}

/** Written inside the same transaction as the change it records, so neither exists without the other. */
export async function writeAudit(trx: Knex.Transaction, entry: AuditEntry): Promise<void> {
  await trx('audit_log').insert({
    actor_id: entry.actorId,
    action: entry.action,
    entity: entry.entity,
    entity_id: String(entry.entityId),
    before: entry.before === undefined ? null : JSON.stringify(entry.before),
    after: entry.after === undefined ? null : JSON.stringify(entry.after),
    at: entry.at ?? new Date(),
  });
}
