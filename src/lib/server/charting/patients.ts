/** Admit, move, discharge and read patients: each change a bed stay with who and when, audited. */
import type { PatientDetail, PatientSummary } from '~/lib/charting/api-types.ts';
import type { AdmitInput } from '~/lib/charting/patient-input.ts';
import { BED_MANAGING_ROLES, hasRole, spansUnits } from '~/lib/auth/roles.ts';
import { ApiError } from '~/lib/server/http.ts';
import { isDuplicateKey, withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import { latestOrders, ordersOf } from '~/lib/server/queries/orders.ts';
import { lastChartedObservation } from '~/lib/server/queries/observations.ts';
import {
  endStay,
  findBed,
  findPatient,
  findPatientByMrn,
  insertPatient,
  insertStay,
  latestStays,
  lockBed,
  lockPatient,
  bedIsActive,
  bedsOfUnit,
  openStayInBed,
  openStayOfPatient,
  patientsInUnits,
  staysOf,
  type StayRow,
} from '~/lib/server/queries/patients.ts';
import { listUnits } from '~/lib/server/queries/units.ts';
import { unitsVisibleTo } from '~/lib/server/units-visible.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { assertPatientAction, patientPermissions } from './access.ts';
import { obsView, orderView, patientSummary, stayView } from './views.ts';

export async function latestStayOf(patientId: number): Promise<StayRow | undefined> {
  return (await latestStays([patientId]))[0];
}

/** Loads the patient and checks the action, or throws 404/403/409. */
export async function authorisePatient(
  user: SessionUser,
  patientId: number,
  action: 'read' | 'chart' | 'order' | 'admit',
) {
  const patient = await findPatient(patientId);
  if (!patient) throw new ApiError(404, 'not_found', 'No patient with that id.');
  const stay = await latestStayOf(patientId);
  assertPatientAction(user, stay, action);
  return { patient, stay: stay! };
}

export async function patientDetail(user: SessionUser, patientId: number): Promise<PatientDetail> {
  const { patient, stay } = await authorisePatient(user, patientId, 'read');
  const [stays, orders, last] = await Promise.all([
    staysOf(patientId),
    ordersOf(patientId),
    lastChartedObservation(patientId),
  ]);
  return {
    ...patientSummary(patient, stay, orders[0]),
    timeZone: stay.time_zone,
    stays: stays.map(stayView),
    orders: orders.map(orderView),
    lastCharted: last ? obsView(last) : null,
    can: (({ chart, order, admit }) => ({ chart, order, admit }))(patientPermissions(user, stay)),
  };
}

/** Units whose patients the list shows: every one the user may see (`unitsVisibleTo`), or the one asked for. */
async function listedUnits(user: SessionUser, unitCode?: string) {
  if (user.role === 'admin') throw new ApiError(403, 'forbidden', 'Administrators do not read clinical records.');
  const units = await unitsVisibleTo(user);
  if (!unitCode) return units;
  const unit = units.find((u) => u.code === unitCode);
  if (!unit)
    throw new ApiError(
      spansUnits(user.role) ? 404 : 403,
      spansUnits(user.role) ? 'not_found' : 'forbidden',
      `Unit ${unitCode} is not one you can see.`,
    );
  return [unit];
}

export async function listPatients(
  user: SessionUser,
  opts: { unit?: string; includeDischarged: boolean },
): Promise<PatientSummary[]> {
  const units = await listedUnits(user, opts.unit);
  const patients = await patientsInUnits(
    units.map((u) => u.id),
    !opts.includeDischarged,
  );
  const ids = patients.map((p) => p.id);
  const [stays, orders] = await Promise.all([latestStays(ids), latestOrders(ids)]);
  const stayBy = new Map(stays.map((s) => [s.patient_id, s]));
  const orderBy = new Map(orders.map((o) => [o.patient_id, o]));
  return patients.map((p) => patientSummary(p, stayBy.get(p.id), orderBy.get(p.id)));
}

async function assertBedForCharge(user: SessionUser, bedId: number, allowOtherUnit: boolean) {
  const bed = await findBed(bedId);
  if (!bed) throw new ApiError(400, 'invalid_input', 'That bed does not exist.', { bedId: 'No such bed' });
  if (!bed.active)
    throw new ApiError(409, 'bed_retired', `Bed ${bed.label} is retired; choose another bed.`, {
      bedId: 'This bed is retired',
    });
  if (!allowOtherUnit && bed.unit_id !== user.unitId)
    throw new ApiError(403, 'forbidden', `Bed ${bed.label} is not in your unit.`);
  return bed;
}

/** Names compared as people read them: Unicode NFC, case-folded, trimmed. */
export function sameName(a: string, b: string): boolean {
  const norm = (x: string) => x.normalize('NFC').trim().toLocaleLowerCase('en');
  return norm(a) === norm(b);
}

/** Re-read under a shared lock: an administrator retiring the bed meanwhile wins or waits, never crosses. */
async function assertBedStillActive(trx: Parameters<typeof bedIsActive>[0], bed: { id: number; label: string }) {
  if (!(await bedIsActive(trx, bed.id)))
    throw new ApiError(409, 'bed_retired', `Bed ${bed.label} is retired; choose another bed.`, {
      bedId: 'This bed is retired',
    });
}

export async function admitPatient(user: SessionUser, input: AdmitInput, now = new Date()): Promise<PatientSummary> {
  if (!hasRole(user.role, BED_MANAGING_ROLES))
    throw new ApiError(403, 'forbidden', 'Only a charge nurse admits patients.');
  const bed = await assertBedForCharge(user, input.bedId, false);
  const admit = () =>
    withTransactionRetry(async (trx) => {
      await lockBed(trx, bed.id);
      await assertBedStillActive(trx, bed);
      if (await openStayInBed(trx, bed.id))
        throw new ApiError(409, 'bed_occupied', `Bed ${bed.label} already has a patient.`, {
          bedId: 'This bed is occupied',
        });
      let existing = await findPatientByMrn(input.mrn, trx);
      if (existing) {
        existing = await lockPatient(trx, existing.id);
        const same =
          sameName(existing!.given_name, input.givenName) && sameName(existing!.family_name, input.familyName);
        if (!same)
          throw new ApiError(
            409,
            'mrn_mismatch',
            `MRN ${input.mrn} belongs to another name on record; check the MRN.`,
            { mrn: 'MRN is on record under another name' },
          );
        if (await openStayOfPatient(trx, existing!.id))
          throw new ApiError(409, 'already_admitted', 'This patient is already in a bed; move them instead.', {
            mrn: 'Already admitted',
          });
      }
      const id =
        existing?.id ??
        (await insertPatient(trx, {
          mrn: input.mrn,
          given_name: input.givenName.normalize('NFC'),
          family_name: input.familyName.normalize('NFC'),
          date_of_birth: input.dateOfBirth,
          co2_retention_risk: input.co2RetentionRisk,
          created_by: user.id,
        }));
      const stayId = await insertStay(trx, { patient_id: id, bed_id: bed.id, started_at: now, started_by: user.id });
      await writeAudit(trx, {
        actorId: user.id,
        action: 'patient.admit',
        entity: 'patient',
        entityId: id,
        after: { stayId, bedId: bed.id, bed: bed.label, mrn: input.mrn, readmission: Boolean(existing) },
        at: now,
      });
      return id;
    });
  let patientId: number;
  try {
    patientId = await admit();
  } catch (err) {
    // Two admissions of one new MRN at once: the loser's insert meets the winner's row. Run it
    // again: it now finds the MRN on record and answers as a re-admission would (409 with its code).
    if (!isDuplicateKey(err)) throw err;
    patientId = await admit();
  }
  return (await summaryOf(patientId))!;
}

/** One patient's summary as lists show it (the answer to admit, move and discharge). */
async function summaryOf(patientId: number): Promise<PatientSummary | undefined> {
  const patient = await findPatient(patientId);
  if (!patient) return undefined;
  const [[stay], [order]] = await Promise.all([latestStays([patientId]), latestOrders([patientId])]);
  return patientSummary(patient, stay, order);
}

export async function movePatient(
  user: SessionUser,
  patientId: number,
  bedId: number,
  now = new Date(),
): Promise<PatientSummary> {
  await authorisePatient(user, patientId, 'admit');
  // A charge nurse may transfer out of their unit to any free bed (the receiving unit then owns the patient).
  const bed = await assertBedForCharge(user, bedId, true);
  await withTransactionRetry(async (trx) => {
    await lockPatient(trx, patientId);
    const open = await openStayOfPatient(trx, patientId);
    if (!open) throw new ApiError(409, 'not_admitted', 'This patient has been discharged.');
    await lockBed(trx, bed.id);
    if (open.bed_id === bed.id)
      throw new ApiError(409, 'same_bed', 'The patient is already in that bed.', { bedId: 'Same bed' });
    await assertBedStillActive(trx, bed);
    if (await openStayInBed(trx, bed.id))
      throw new ApiError(409, 'bed_occupied', `Bed ${bed.label} already has a patient.`, {
        bedId: 'This bed is occupied',
      });
    await endStay(trx, open.id, { ended_at: now, end_reason: 'moved', ended_by: user.id });
    const stayId = await insertStay(trx, {
      patient_id: patientId,
      bed_id: bed.id,
      started_at: now,
      started_by: user.id,
    });
    await writeAudit(trx, {
      actorId: user.id,
      action: 'patient.move',
      entity: 'patient',
      entityId: patientId,
      before: { stayId: open.id, bedId: open.bed_id },
      after: { stayId, bedId: bed.id },
      at: now,
    });
  });
  return (await summaryOf(patientId))!;
}

export async function dischargePatient(
  user: SessionUser,
  patientId: number,
  note: string | undefined,
  now = new Date(),
): Promise<PatientSummary> {
  await authorisePatient(user, patientId, 'admit');
  await withTransactionRetry(async (trx) => {
    await lockPatient(trx, patientId);
    const open = await openStayOfPatient(trx, patientId);
    if (!open) throw new ApiError(409, 'not_admitted', 'This patient has already been discharged.');
    await endStay(trx, open.id, { ended_at: now, end_reason: 'discharged', ended_by: user.id });
    await writeAudit(trx, {
      actorId: user.id,
      action: 'patient.discharge',
      entity: 'patient',
      entityId: patientId,
      before: { stayId: open.id, bedId: open.bed_id },
      after: { note: note ?? null },
      at: now,
    });
  });
  return (await summaryOf(patientId))!;
}

/** A unit's beds with occupancy. Charge nurses also see every other unit's free beds (for transfers). */
export async function unitBeds(user: SessionUser, unitCode: string) {
  const allowOthers = hasRole(user.role, BED_MANAGING_ROLES);
  const units = allowOthers ? await listUnits(null) : await unitsVisibleTo(user);
  const unit = units.find((u) => u.code === unitCode);
  if (!unit) throw new ApiError(403, 'forbidden', `Unit ${unitCode} is not one you can see.`);
  return { unit: { code: unit.code, name: unit.name }, beds: await bedsOfUnit(unit.id) };
}
