/** Target-band orders: a new order supersedes the newest one; a writer who saw an older one gets 409. */
import type { OrderView } from '~/lib/charting/api-types.ts';
import type { TargetOrderInput } from '~/lib/charting/target-input.ts';
import { ApiError } from '~/lib/server/http.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import { insertOrder, ordersOf } from '~/lib/server/queries/orders.ts';
import { lockPatient } from '~/lib/server/queries/patients.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { authorisePatient } from './patients.ts';
import { scale2Basis } from '~/lib/server/bloodgas/scale2.ts';
import { orderView } from './views.ts';

export async function listOrders(user: SessionUser, patientId: number): Promise<OrderView[]> {
  await authorisePatient(user, patientId, 'read');
  return (await ordersOf(patientId)).map(orderView);
}

export async function orderTarget(
  user: SessionUser,
  patientId: number,
  input: TargetOrderInput,
  now = new Date(),
): Promise<OrderView> {
  const { stay } = await authorisePatient(user, patientId, 'order');
  const id = await withTransactionRetry(async (trx) => {
    // The patient row lock serialises concurrent orders, so the stale check below cannot race.
    await lockPatient(trx, patientId);
    const [newest] = await ordersOf(patientId, trx);
    const newestId = newest?.id ?? null;
    if (newestId !== input.basedOnOrderId) {
      throw new ApiError(
        409,
        'stale_order',
        newest
          ? `A newer band (${newest.low}–${newest.high} %, by ${newest.ordered_by_name}) was ordered after the one you saw. Check the history and order again.`
          : 'The order history changed while you were editing. Check it and order again.',
      );
    }
    const basis = input.news2Scale === 2 ? await scale2Basis(patientId, stay.time_zone, now, trx) : null;
    const orderId = await insertOrder(trx, {
      patient_id: patientId,
      low: input.low,
      high: input.high,
      news2_scale: input.news2Scale,
      preset: input.preset ?? null,
      reason: input.reason,
      scale_reason: input.scaleReason ?? null,
      supersedes_id: newestId,
      ordered_by: user.id,
      ordered_at: now,
      ...(basis ? { scale2_basis: basis } : {}),
    });
    await writeAudit(trx, {
      actorId: user.id,
      action: 'target.order',
      entity: 'patient',
      entityId: patientId,
      before: newest
        ? { orderId: newest.id, low: newest.low, high: newest.high, news2Scale: newest.news2_scale }
        : null,
      after: {
        orderId,
        low: input.low,
        high: input.high,
        news2Scale: input.news2Scale,
        reason: input.reason,
        ...(basis ? { scale2Basis: basis } : {}),
      },
      at: now,
    });
    return orderId;
  });
  return orderView((await ordersOf(patientId)).find((o) => o.id === id)!);
}
