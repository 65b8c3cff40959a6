/** People's side of escalations: list, read, claim, close; and the per-unit settings. */
import { spansUnits } from '~/lib/auth/roles.ts';
import { KIND_LABELS, OUTCOME_LABELS, type EscalationEvidence, type EscalationKind, type Outcome } from '~/lib/escalations/decide.ts';
import type { UnitSettingsInput } from '~/lib/escalations/inputs.ts';
import { patientLabel } from '~/lib/patients/label.ts';
import { DEFAULT_UNIT_SETTINGS, settingsFromRow } from '~/lib/units/settings.ts';
import { ApiError } from '~/lib/server/http.ts';
import { db } from '~/lib/server/queries/db.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import { eventsOf, findEscalation, insertEvent, listEscalations, lockEscalation, updateEscalation, type EscalationListRow } from '~/lib/server/queries/escalations.ts';
import { unitSettingsRow, upsertUnitSettings } from '~/lib/server/queries/unit-settings.ts';
import { listUnits } from '~/lib/server/queries/units.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
const parse = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v);

export function escalationView(e: EscalationListRow) {
  return {
    id: e.id, kind: e.kind, kindLabel: KIND_LABELS[e.kind], severity: e.severity, state: e.state,
    raisedAt: iso(e.raised_at)!, runStart: iso(e.run_start)!, runEnd: iso(e.run_end)!,
    unit: { code: e.unit_code, name: e.unit_name }, bedLabel: e.bed_label,
    patient: { id: e.patient_id, label: patientLabel(e.given_name, e.family_name, e.mrn) },
    claimedBy: e.claimed_by_name, claimedAt: iso(e.claimed_at), closedBy: e.closed_by_name, closedAt: iso(e.closed_at),
    outcome: e.outcome, outcomeLabel: e.outcome ? OUTCOME_LABELS[e.outcome as Outcome | 'condition_cleared'] : null, closeNote: e.close_note,
    lastNotifiedAt: iso(e.last_notified_at), notifyCount: e.notify_count, backInBandAt: iso(e.back_in_band_at), evidence: parse(e.evidence) as EscalationEvidence,
  };
}
export type EscalationView = ReturnType<typeof escalationView>;

async function unitsFor(user: SessionUser, unitCode?: string) {
  if (user.role === 'admin') throw new ApiError(403, 'forbidden', 'Administrators do not handle escalations.');
  const units = await listUnits(spansUnits(user.role) ? null : user.unitId);
  if (!unitCode) return units;
  const unit = units.find((u) => u.code === unitCode);
  if (!unit) throw new ApiError(403, 'forbidden', `Unit ${unitCode} is not one you can see.`);
  return [unit];
}

export async function listForUser(user: SessionUser, q: { state: 'open' | 'closed'; unit?: string; kind?: EscalationKind; patient?: number; limit: number }) {
  const units = await unitsFor(user, q.unit);
  // Wean prompts belong to the board; the queue holds what someone must act on, unless asked by kind.
  const kinds: EscalationKind[] = q.kind ? [q.kind] : ['below_band', 'probe_check', 'occult_hypoxaemia'];
  const rows = await listEscalations({ unitIds: units.map((u) => u.id), open: q.state === 'open', kinds, patientId: q.patient, limit: q.limit });
  return rows.map(escalationView);
}

function assertCanSee(user: SessionUser, e: EscalationListRow) {
  if (user.role === 'admin') throw new ApiError(403, 'forbidden', 'Administrators do not handle escalations.');
  if (!spansUnits(user.role) && e.unit_id !== user.unitId) throw new ApiError(403, 'forbidden', 'This escalation is in another unit.');
}

/** The escalation if this user may see it; 404 or 403 otherwise. */
async function visibleEscalation(user: SessionUser, id: number): Promise<EscalationListRow> {
  const e = await findEscalation(id);
  if (!e) throw new ApiError(404, 'not_found', 'No escalation with that id.');
  assertCanSee(user, e);
  return e;
}

export async function escalationDetail(user: SessionUser, id: number) {
  const e = await visibleEscalation(user, id);
  const events = await eventsOf(id);
  return { ...escalationView(e), events: events.map((v) => ({ id: Number(v.id), type: v.type, at: iso(v.at)!, actor: v.actor_name ?? 'Ebbwatch', detail: parse(v.detail) })) };
}

export async function claimEscalation(user: SessionUser, id: number, now = new Date()) {
  const e = await visibleEscalation(user, id);
  await db().transaction(async (trx) => {
    const row = (await lockEscalation(trx, id))!;
    if (row.state === 'closed') throw new ApiError(409, 'closed', 'This escalation is already closed.');
    if (row.state === 'claimed') throw new ApiError(409, 'already_claimed', `Already claimed by ${e.claimed_by_name ?? 'someone else'}.`);
    await updateEscalation(trx, id, { state: 'claimed', claimed_by: user.id, claimed_at: now });
    await insertEvent(trx, { escalation_id: id, type: 'claimed', actor_id: user.id, at: now });
    await writeAudit(trx, { actorId: user.id, action: 'escalation.claim', entity: 'escalation', entityId: id, before: { state: row.state }, after: { state: 'claimed' }, at: now });
  });
  return escalationDetail(user, id);
}

export async function closeEscalation(user: SessionUser, id: number, outcome: Outcome, note: string | undefined, now = new Date()) {
  await visibleEscalation(user, id);
  await db().transaction(async (trx) => {
    const row = (await lockEscalation(trx, id))!;
    if (row.state === 'closed') throw new ApiError(409, 'closed', 'This escalation is already closed.');
    await updateEscalation(trx, id, { state: 'closed', closed_by: user.id, closed_at: now, outcome, close_note: note ?? null });
    await insertEvent(trx, { escalation_id: id, type: 'closed', actor_id: user.id, at: now, detail: { outcome, note: note ?? null } });
    await writeAudit(trx, { actorId: user.id, action: 'escalation.close', entity: 'escalation', entityId: id, before: { state: row.state }, after: { state: 'closed', outcome, note: note ?? null }, at: now });
  });
  return escalationDetail(user, id);
}

async function unitByCode(code: string) {
  const unit = (await listUnits(null)).find((u) => u.code === code);
  if (!unit) throw new ApiError(404, 'not_found', `No unit ${code}.`);
  return unit;
}

export async function readUnitSettings(user: SessionUser, code: string) {
  const unit = await unitByCode(code);
  if (user.role !== 'admin' && !(user.role === 'charge' && user.unitId === unit.id)) throw new ApiError(403, 'forbidden', 'Only administrators (and the unit\'s charge nurse, to read) see unit settings.');
  const row = await unitSettingsRow(unit.id);
  const s = settingsFromRow(row);
  return {
    unit: { code: unit.code, name: unit.name }, configured: row !== undefined,
    settings: { consecutiveCharted: s.consecutiveCharted, deviceDwellMin: s.deviceDwellMin, urgentMarginPoints: s.urgentMarginPoints, urgentFloorPct: s.urgentFloorPct,
      cannotVerifyMin: s.cannotVerifyMin, aboveOnOxygenMin: s.aboveOnOxygenMin, renotifyMin: s.renotifyMin, overdueMin: s.overdueMin, outreachEmails: s.outreachEmails,
      gasUnit: s.gasUnit, barometricMmHg: s.barometricMmHg },
    updatedAt: row ? iso(row.updated_at) : null,
  };
}

export async function writeUnitSettings(admin: SessionUser, code: string, input: UnitSettingsInput, now = new Date()) {
  const unit = await unitByCode(code);
  await db().transaction(async (trx) => {
    const before = await unitSettingsRow(unit.id, trx);
    const row = {
      unit_id: unit.id, consecutive_charted: input.consecutiveCharted, device_dwell_min: input.deviceDwellMin, urgent_margin_points: input.urgentMarginPoints,
      urgent_floor_pct: input.urgentFloorPct, cannot_verify_min: input.cannotVerifyMin, above_on_oxygen_min: input.aboveOnOxygenMin, renotify_min: input.renotifyMin,
      overdue_min: input.overdueMin, outreach_emails: input.outreachEmails.join(', '), updated_by: admin.id, updated_at: now,
      gas_unit: input.gasUnit ?? before?.gas_unit ?? DEFAULT_UNIT_SETTINGS.gasUnit, barometric_mmhg: input.barometricMmHg ?? before?.barometric_mmhg ?? DEFAULT_UNIT_SETTINGS.barometricMmHg,
    };
    await upsertUnitSettings(trx, row);
    await writeAudit(trx, { actorId: admin.id, action: 'unit.settings', entity: 'unit', entityId: unit.id, before: before ?? null, after: row, at: now });
  });
  return readUnitSettings(admin, code);
}
