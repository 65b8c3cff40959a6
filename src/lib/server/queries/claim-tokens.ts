import type { Knex } from 'knex';
import { db } from './db.ts';

export interface ClaimTokenRow {
  id: number;
  escalation_id: number;
  token_hash: string;
  created_at: Date;
  expires_at: Date;
  used_at: Date | null;
  used_by: number | null;
}

export async function insertClaimToken(
  trx: Knex.Transaction,
  row: Omit<ClaimTokenRow, 'id' | 'used_at' | 'used_by'>,
): Promise<void> {
  await trx('escalation_claim_tokens').insert(row);
}

export async function findClaimToken(
  tokenHash: string,
  conn: Knex | Knex.Transaction = db(),
): Promise<ClaimTokenRow | undefined> {
  return conn<ClaimTokenRow>('escalation_claim_tokens').where({ token_hash: tokenHash }).first();
}

/** Marks a token used, once: true only for the caller that flipped it. */
export async function useClaimToken(trx: Knex.Transaction, id: number, userId: number, at: Date): Promise<boolean> {
  return (
    (await trx('escalation_claim_tokens')
      .where({ id })
      .whereNull('used_at')
      .update({ used_at: at, used_by: userId })) === 1
  );
}
