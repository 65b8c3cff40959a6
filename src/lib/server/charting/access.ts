/**
 * Who may do what to which patient, decided on the server from the patient's bed now (or, once
 * discharged, the unit of their last stay).
 */
import {
  BED_MANAGING_ROLES,
  CHARTING_ROLES,
  CORRECTING_OTHERS_ROLES,
  hasRole,
  ORDERING_ROLES,
  seesUnit,
  spansUnits,
} from '~/lib/auth/roles.ts';
import { ApiError } from '~/lib/server/http.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import type { StayRow } from '~/lib/server/queries/patients.ts';

export type PatientAction = 'read' | 'chart' | 'order' | 'admit';

export function patientPermissions(user: SessionUser, latestStay: StayRow | undefined) {
  const admitted = latestStay !== undefined && latestStay.ended_at === null;
  const inOwnUnit = latestStay !== undefined && user.unitId !== null && latestStay.unit_id === user.unitId;
  // A patient with no stay on record belongs to no unit: only roles that span units read them.
  const read = latestStay === undefined ? spansUnits(user.role) : seesUnit(user, latestStay.unit_id);
  return {
    read,
    chart: admitted && inOwnUnit && hasRole(user.role, CHARTING_ROLES),
    order: admitted && hasRole(user.role, ORDERING_ROLES),
    admit: admitted && inOwnUnit && hasRole(user.role, BED_MANAGING_ROLES),
  };
}

/** Throws 403 when the role or unit does not allow the action, 409 when the patient is discharged. */
export function assertPatientAction(user: SessionUser, latestStay: StayRow | undefined, action: PatientAction): void {
  const can = patientPermissions(user, latestStay);
  if (!can.read)
    throw new ApiError(403, 'forbidden', 'This patient is not in your unit, or your role does not read charts.');
  if (can[action]) return;
  const admitted = latestStay !== undefined && latestStay.ended_at === null;
  if (!admitted && action !== 'read')
    throw new ApiError(409, 'not_admitted', 'This patient has been discharged; their record is read-only.');
  throw new ApiError(403, 'forbidden', `Your role (${user.role}) cannot do this for this patient.`);
}

/**
 * The one rule for correcting a charted row or marking it entered in error (obs and blood gases
 * alike): only its current version changes, and only the caller's own entry unless their role
 * corrects others'. `what` names the row in the 409; `notOwn` is the whole 403 sentence.
 */
export function assertChangeable(
  user: SessionUser,
  row: { status: string; recorded_by: number | null },
  words: { what: string; notOwn: string },
): void {
  if (row.status !== 'current') {
    throw new ApiError(
      409,
      'not_current',
      row.status === 'superseded'
        ? `This ${words.what} was already corrected; correct the newer version.`
        : `This ${words.what} is already marked entered in error.`,
    );
  }
  if (!hasRole(user.role, CORRECTING_OTHERS_ROLES) && row.recorded_by !== user.id)
    throw new ApiError(403, 'forbidden', words.notOwn);
}
