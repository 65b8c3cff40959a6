/** Units and beds run by administrators: create and rename units; add, rename, reorder and retire beds. Audited. */
import { toIso } from '~/lib/time/iso.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { ApiError } from './http.ts';
import { writeAudit } from './queries/audit.ts';
import {
  insertBed,
  insertUnit,
  lockBedsOfUnit,
  lockUnitByCode,
  openStayInBedLocked,
  unitsWithBeds,
  updateBed,
  updateUnit,
  type AdminBedRow,
} from './queries/admin-units.ts';
import type { CreateUnitInput } from '~/lib/staff/inputs.ts';

const isDuplicate = (err: unknown) => (err as { code?: string })?.code === 'ER_DUP_ENTRY';

function bedView(b: AdminBedRow) {
  return {
    id: b.id,
    label: b.label,
    position: b.position,
    active: Boolean(b.active),
    retiredAt: toIso(b.retired_at),
    occupied: Boolean(b.occupied),
  };
}

export async function listUnitsWithBeds() {
  const { units, beds } = await unitsWithBeds();
  return {
    units: units.map((u) => ({
      id: u.id,
      code: u.code,
      name: u.name,
      hospital: u.hospital,
      timeZone: u.time_zone,
      beds: beds.filter((b) => b.unit_id === u.id).map(bedView),
    })),
  };
}

export async function createUnit(actorId: number, input: CreateUnitInput, now = new Date()) {
  try {
    return await withTransactionRetry(async (trx) => {
      const row = { code: input.code, name: input.name, hospital: input.hospital, time_zone: input.timeZone };
      const id = await insertUnit(trx, row);
      await writeAudit(trx, { actorId, action: 'unit.create', entity: 'unit', entityId: id, after: input, at: now });
      return { unit: { id, ...input, beds: [] } };
    });
  } catch (err) {
    if (isDuplicate(err))
      throw new ApiError(409, 'duplicate_code', `A unit with code ${input.code} exists.`, { code: 'Already in use' });
    throw err;
  }
}

async function unitOr404(trx: Parameters<typeof lockUnitByCode>[0], code: string) {
  const unit = await lockUnitByCode(trx, code.toUpperCase());
  if (!unit) throw new ApiError(404, 'not_found', `No unit ${code}.`);
  return unit;
}

export async function renameUnit(
  actorId: number,
  code: string,
  input: { name?: string; hospital?: string },
  now = new Date(),
) {
  return withTransactionRetry(async (trx) => {
    const unit = await unitOr404(trx, code);
    await updateUnit(trx, unit.id, input);
    await writeAudit(trx, {
      actorId,
      action: 'unit.update',
      entity: 'unit',
      entityId: unit.id,
      before: { name: unit.name, hospital: unit.hospital },
      after: input,
      at: now,
    });
    return {
      unit: {
        id: unit.id,
        code: unit.code,
        name: input.name ?? unit.name,
        hospital: input.hospital ?? unit.hospital,
        timeZone: unit.time_zone,
      },
    };
  });
}

export async function addBed(actorId: number, code: string, label: string, now = new Date()) {
  try {
    return await withTransactionRetry(async (trx) => {
      const unit = await unitOr404(trx, code);
      const beds = await lockBedsOfUnit(trx, unit.id);
      const position = beds.reduce((m, b) => Math.max(m, b.position), -1) + 1;
      const id = await insertBed(trx, { unit_id: unit.id, label, position });
      await writeAudit(trx, {
        actorId,
        action: 'bed.create',
        entity: 'bed',
        entityId: id,
        after: { unit: unit.code, label, position },
        at: now,
      });
      return { bed: { id, label, position, active: true, retiredAt: null, occupied: false } };
    });
  } catch (err) {
    if (isDuplicate(err))
      throw new ApiError(
        409,
        'duplicate_label',
        `Unit ${code} already has a bed labelled ${label} (retired beds keep their labels).`,
        { label: 'Already in use in this unit' },
      );
    throw err;
  }
}

async function bedOfUnit(trx: Parameters<typeof lockUnitByCode>[0], code: string, bedId: number) {
  const unit = await unitOr404(trx, code);
  const beds = await lockBedsOfUnit(trx, unit.id);
  const bed = beds.find((b) => b.id === bedId);
  if (!bed) throw new ApiError(404, 'not_found', `Unit ${unit.code} has no bed ${bedId}.`);
  return { unit, beds, bed };
}

export async function renameBed(actorId: number, code: string, bedId: number, label: string, now = new Date()) {
  try {
    return await withTransactionRetry(async (trx) => {
      const { bed } = await bedOfUnit(trx, code, bedId);
      await updateBed(trx, bed.id, { label });
      await writeAudit(trx, {
        actorId,
        action: 'bed.rename',
        entity: 'bed',
        entityId: bed.id,
        before: { label: bed.label },
        after: { label },
        at: now,
      });
      return { bed: { id: bed.id, label } };
    });
  } catch (err) {
    if (isDuplicate(err))
      throw new ApiError(409, 'duplicate_label', `Unit ${code} already has a bed labelled ${label}.`, {
        label: 'Already in use in this unit',
      });
    throw err;
  }
}

/** The new order must list every active bed of the unit exactly once; retired beds go after them. */
export async function reorderBeds(actorId: number, code: string, bedIds: number[], now = new Date()) {
  return withTransactionRetry(async (trx) => {
    const unit = await unitOr404(trx, code);
    const beds = await lockBedsOfUnit(trx, unit.id);
    const active = beds.filter((b) => b.active).map((b) => b.id);
    const same = active.length === bedIds.length && bedIds.every((id) => active.includes(id));
    if (!same)
      throw new ApiError(400, 'invalid_input', 'bedIds: list every active bed of the unit exactly once.', {
        bedIds: 'List every active bed of the unit exactly once',
      });
    const retired = beds.filter((b) => !b.active).map((b) => b.id);
    const order = [...bedIds, ...retired];
    for (const [position, id] of order.entries()) await updateBed(trx, id, { position });
    await writeAudit(trx, {
      actorId,
      action: 'bed.reorder',
      entity: 'unit',
      entityId: unit.id,
      before: { bedIds: beds.filter((b) => b.active).map((b) => b.id) },
      after: { bedIds },
      at: now,
    });
    return { bedIds };
  });
}

/** A retired bed keeps its stays and readings; it leaves the board and cannot take a patient. */
export async function retireBed(actorId: number, code: string, bedId: number, reason: string, now = new Date()) {
  return withTransactionRetry(async (trx) => {
    const { bed } = await bedOfUnit(trx, code, bedId);
    if (!bed.active) throw new ApiError(409, 'already_retired', `Bed ${bed.label} is already retired.`);
    if (await openStayInBedLocked(trx, bed.id))
      throw new ApiError(409, 'bed_occupied', `Bed ${bed.label} has a patient; move or discharge them first.`);
    await updateBed(trx, bed.id, { active: false, retired_at: now, retired_by: actorId });
    await writeAudit(trx, {
      actorId,
      action: 'bed.retire',
      entity: 'bed',
      entityId: bed.id,
      before: { active: true },
      after: { active: false, reason },
      at: now,
    });
    return { bed: { id: bed.id, label: bed.label, active: false, retiredAt: now.toISOString() } };
  });
}
