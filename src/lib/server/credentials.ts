/**
 * Revoking a credential a machine sends with (a device key, an HL7 gateway): under its row lock,
 * once only, and audited in the same transaction. The row stays, with who revoked it and why.
 */
import type { Knex } from 'knex';
import { ApiError } from '~/lib/server/http.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';

export interface CredentialKind {
  entity: 'device_key' | 'hl7_gateway';
  /** "device key": in "No device key with that id." */
  noun: string;
  /** "key": in "This key was already revoked." */
  shortNoun: string;
  lock: (trx: Knex.Transaction, id: number) => Promise<{ revoked_at: Date | null } | undefined>;
  revoke: (
    trx: Knex.Transaction,
    id: number,
    fields: { revoked_at: Date; revoked_by: number | null; revoke_reason: string },
  ) => Promise<void>;
}

export async function revokeCredential(
  kind: CredentialKind,
  actorId: number | null,
  id: number,
  reason: string,
  now: Date,
): Promise<void> {
  await withTransactionRetry(async (trx) => {
    const row = await kind.lock(trx, id);
    if (!row) throw new ApiError(404, 'not_found', `No ${kind.noun} with that id.`);
    if (row.revoked_at) throw new ApiError(409, 'already_revoked', `This ${kind.shortNoun} was already revoked.`);
    await kind.revoke(trx, id, { revoked_at: now, revoked_by: actorId, revoke_reason: reason });
    await writeAudit(trx, {
      actorId,
      action: `${kind.entity}.revoke`,
      entity: kind.entity,
      entityId: id,
      before: { revokedAt: null },
      after: { revokedAt: now.toISOString(), reason },
      at: now,
    });
  });
}
