/** The charge nurse assigns a nurse to a bed (or clears it); history is kept and audited. */
import { CHARTING_ROLES, hasRole } from '~/lib/auth/roles.ts';
import { ApiError } from '~/lib/server/http.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import {
  activeNursesOfUnit,
  endAssignment,
  findActiveUser,
  insertAssignment,
  openAssignment,
} from '~/lib/server/queries/assignments.ts';
import { findBed } from '~/lib/server/queries/patients.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';

export async function assignNurse(charge: SessionUser, bedId: number, nurseId: number | null, now = new Date()) {
  const bed = await findBed(bedId);
  if (!bed) throw new ApiError(404, 'not_found', 'No bed with that id.');
  if (bed.unit_id !== charge.unitId) throw new ApiError(403, 'forbidden', `Bed ${bed.label} is not in your unit.`);
  if (nurseId !== null) {
    const nurse = await findActiveUser(nurseId);
    if (!nurse || !hasRole(nurse.role, CHARTING_ROLES) || nurse.unit_id !== bed.unit_id) {
      throw new ApiError(400, 'invalid_input', 'Choose an active nurse of this unit.', {
        nurseId: 'Not an active nurse of this unit',
      });
    }
  }
  await withTransactionRetry(async (trx) => {
    const open = await openAssignment(trx, bedId);
    if (open?.nurse_id === nurseId) return;
    if (open) await endAssignment(trx, open.id, charge.id, now);
    if (nurseId !== null)
      await insertAssignment(trx, { bed_id: bedId, nurse_id: nurseId, assigned_by: charge.id, assigned_at: now });
    await writeAudit(trx, {
      actorId: charge.id,
      action: 'bed.assign',
      entity: 'bed',
      entityId: bedId,
      before: { nurseId: open?.nurse_id ?? null },
      after: { nurseId },
      at: now,
    });
  });
  return { bedId, nurseId };
}

export async function unitNurses(charge: SessionUser) {
  if (charge.unitId === null) return [];
  return activeNursesOfUnit(charge.unitId);
}
