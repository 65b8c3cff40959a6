/** People's side of escalations: list, read, claim, close; and the per-unit settings. */
import { toIso } from '~/lib/time/iso.ts';
import type { Knex } from 'knex';
import { isTrusted, type Reading } from '~/lib/oxygenation/index.ts';
import { readingsByPatient } from '~/lib/server/charting/readings.ts';
import { recentReadings } from '~/lib/server/queries/recent-readings.ts';
import { CLAIMING_ROLES, CLOSING_ROLES, hasRole, seesUnit, UNIT_SETTINGS_READING_ROLES } from '~/lib/auth/roles.ts';
import type { EscalationDetail, EscalationView, QueueEscalation } from '~/lib/escalations/api-types.ts';
import {
  KIND_LABELS,
  OUTCOME_LABELS,
  type EscalationEvidence,
  type EscalationKind,
  type Outcome,
} from '~/lib/escalations/decide.ts';
import type { UnitSettingsInput } from '~/lib/escalations/inputs.ts';
import { patientLabel } from '~/lib/patients/label.ts';
import { DEFAULT_UNIT_SETTINGS, settingsFromRow } from '~/lib/units/settings.ts';
import { ApiError } from '~/lib/server/http.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import {
  eventsOf,
  findEscalation,
  insertEvent,
  listEscalations,
  lockEscalation,
  updateEscalation,
  type EscalationListRow,
} from '~/lib/server/queries/escalations.ts';
import { unitSettingsRow, upsertUnitSettings } from '~/lib/server/queries/unit-settings.ts';
import { listUnits } from '~/lib/server/queries/units.ts';
import { unitsVisibleTo } from '~/lib/server/units-visible.ts';
import { escalationPermissions } from './access.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';

const parse = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v);

export function escalationView(e: EscalationListRow, user: SessionUser): EscalationView {
  const minutes = (a: Date | null, b: Date | null) =>
    a && b ? Math.max(0, Math.round((new Date(b).getTime() - new Date(a).getTime()) / 60_000)) : null;
  return {
    raisedToClaimedMin: minutes(e.raised_at, e.claimed_at),
    claimedToClosedMin: minutes(e.claimed_at, e.closed_at),
    id: e.id,
    kind: e.kind,
    kindLabel: KIND_LABELS[e.kind],
    severity: e.severity,
    state: e.state,
    raisedAt: toIso(e.raised_at)!,
    runStart: toIso(e.run_start)!,
    runEnd: toIso(e.run_end)!,
    unit: { code: e.unit_code, name: e.unit_name, timeZone: e.unit_time_zone },
    bedLabel: e.bed_label,
    patient: { id: e.patient_id, label: patientLabel(e.given_name, e.family_name, e.mrn) },
    claimedBy: e.claimed_by_name,
    claimedAt: toIso(e.claimed_at),
    closedBy: e.closed_by_name,
    closedAt: toIso(e.closed_at),
    outcome: e.outcome,
    outcomeLabel: e.outcome ? OUTCOME_LABELS[e.outcome as Outcome | 'condition_cleared'] : null,
    closeNote: e.close_note,
    lastNotifiedAt: toIso(e.last_notified_at),
    notifyCount: e.notify_count,
    backInBandAt: toIso(e.back_in_band_at),
    evidence: parse(e.evidence) as EscalationEvidence,
    can: escalationPermissions(user, e),
  };
}

async function unitsFor(user: SessionUser, unitCode?: string) {
  if (user.role === 'admin') throw new ApiError(403, 'forbidden', 'Administrators do not handle escalations.');
  const units = await unitsVisibleTo(user);
  if (!unitCode) return units;
  const unit = units.find((u) => u.code === unitCode);
  if (!unit) throw new ApiError(403, 'forbidden', `Unit ${unitCode} is not one you can see.`);
  return [unit];
}

export async function listForUser(
  user: SessionUser,
  q: { state: 'open' | 'closed'; unit?: string; kind?: EscalationKind; patient?: number; limit: number },
): Promise<QueueEscalation[]> {
  const units = await unitsFor(user, q.unit);
  // Wean prompts belong to the board; the queue holds what someone must act on, unless asked by kind.
  const kinds: EscalationKind[] = q.kind ? [q.kind] : ['below_band', 'probe_check', 'occult_hypoxaemia'];
  const now = Date.now();
  const rows = await listEscalations({
    unitIds: units.map((u) => u.id),
    open: q.state === 'open',
    kinds,
    patientId: q.patient,
    limit: q.limit,
    // The Closed tab: the last seven days.
    ...(q.state === 'closed' ? { closedSince: new Date(now - CLOSED_DAYS * 24 * 3_600_000) } : {}),
  });
  const views = rows.map((row) => escalationView(row, user));
  if (q.state !== 'open' || views.length === 0) return views;
  // Open ones carry the patient's SpO₂ now (with its time) and the last 30 minutes as a small trend.
  const readings = readingsByPatient(
    await recentReadings([...new Set(views.map((v) => v.patient.id))], {
      device: new Date(now - TREND_MIN * 60_000),
      charted: new Date(now - 75 * 60_000),
    }),
  );
  return views.map((v) => ({ ...v, ...spo2Now(readings.get(v.patient.id) ?? [], now) }));
}

const CLOSED_DAYS = 7;
const TREND_MIN = 30;

/** The newest SpO₂ reading and one point a minute (the minute's last value) over the last 30 minutes. */
function spo2Now(
  readings: Reading[],
  now: number,
): {
  current: { spo2: number; at: string; source: string; trusted: boolean } | null;
  trend: { t: number; v: number }[];
} {
  const withSpo2 = readings.filter((r) => r.spo2 !== null && r.at <= now);
  const last = withSpo2[withSpo2.length - 1];
  const perMinute = new Map<number, number>();
  for (const r of withSpo2) if (r.at >= now - TREND_MIN * 60_000) perMinute.set(Math.floor(r.at / 60_000), r.spo2!);
  return {
    current: last
      ? { spo2: last.spo2!, at: new Date(last.at).toISOString(), source: last.source, trusted: isTrusted(last) }
      : null,
    trend: [...perMinute].map(([m, v]) => ({ t: m * 60_000, v })),
  };
}

function assertCanSee(user: SessionUser, e: EscalationListRow) {
  if (user.role === 'admin') throw new ApiError(403, 'forbidden', 'Administrators do not handle escalations.');
  if (!seesUnit(user, e.unit_id)) throw new ApiError(403, 'forbidden', 'This escalation is in another unit.');
}

/** The escalation if this user may see it; 404 or 403 otherwise. */
async function visibleEscalation(user: SessionUser, id: number): Promise<EscalationListRow> {
  const e = await findEscalation(id);
  if (!e) throw new ApiError(404, 'not_found', 'No escalation with that id.');
  assertCanSee(user, e);
  return e;
}

export async function escalationDetail(user: SessionUser, id: number): Promise<EscalationDetail> {
  const e = await visibleEscalation(user, id);
  const events = await eventsOf(id);
  return {
    ...escalationView(e, user),
    events: events.map((v) => ({
      id: Number(v.id),
      type: v.type,
      at: toIso(v.at)!,
      actor: v.actor_name ?? 'Ebbwatch',
      detail: parse(v.detail),
    })),
  };
}

export async function claimEscalation(user: SessionUser, id: number, now = new Date()): Promise<EscalationDetail> {
  await withTransactionRetry((trx) => claimInTransaction(trx, user, id, now));
  return escalationDetail(user, id);
}

/** Claims in the caller's transaction (the claim button, or an e-mail claim link spending its token). */
export async function claimInTransaction(
  trx: Knex.Transaction,
  user: SessionUser,
  id: number,
  now: Date,
  via?: string,
): Promise<void> {
  if (!hasRole(user.role, CLAIMING_ROLES))
    throw new ApiError(403, 'forbidden', 'Only nurses, charge nurses and outreach claim escalations.');
  const e = await visibleEscalation(user, id);
  const row = (await lockEscalation(trx, id))!;
  if (row.state === 'closed') throw new ApiError(409, 'closed', 'This escalation is already closed.');
  if (row.state === 'claimed')
    throw new ApiError(409, 'already_claimed', `Already claimed by ${e.claimed_by_name ?? 'someone else'}.`);
  await updateEscalation(trx, id, { state: 'claimed', claimed_by: user.id, claimed_at: now });
  await insertEvent(trx, {
    escalation_id: id,
    type: 'claimed',
    actor_id: user.id,
    at: now,
    ...(via ? { detail: { via } } : {}),
  });
  await writeAudit(trx, {
    actorId: user.id,
    action: 'escalation.claim',
    entity: 'escalation',
    entityId: id,
    before: { state: row.state },
    after: { state: 'claimed', ...(via ? { via } : {}) },
    at: now,
  });
}

export async function closeEscalation(
  user: SessionUser,
  id: number,
  outcome: Outcome,
  note: string | undefined,
  now = new Date(),
): Promise<EscalationDetail> {
  if (!hasRole(user.role, CLOSING_ROLES))
    throw new ApiError(403, 'forbidden', 'Only charge nurses and outreach close escalations.');
  await visibleEscalation(user, id);
  await withTransactionRetry(async (trx) => {
    const row = (await lockEscalation(trx, id))!;
    if (row.state === 'closed') throw new ApiError(409, 'closed', 'This escalation is already closed.');
    await updateEscalation(trx, id, {
      state: 'closed',
      closed_by: user.id,
      closed_at: now,
      outcome,
      close_note: note ?? null,
    });
    await insertEvent(trx, {
      escalation_id: id,
      type: 'closed',
      actor_id: user.id,
      at: now,
      detail: { outcome, note: note ?? null },
    });
    await writeAudit(trx, {
      actorId: user.id,
      action: 'escalation.close',
      entity: 'escalation',
      entityId: id,
      before: { state: row.state },
      after: { state: 'closed', outcome, note: note ?? null },
      at: now,
    });
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
  const mayRead = user.role === 'admin' || (hasRole(user.role, UNIT_SETTINGS_READING_ROLES) && user.unitId === unit.id);
  if (!mayRead)
    throw new ApiError(
      403,
      'forbidden',
      "Only administrators (and the unit's charge nurse, to read) see unit settings.",
    );
  const row = await unitSettingsRow(unit.id);
  const s = settingsFromRow(row);
  return {
    unit: { code: unit.code, name: unit.name },
    configured: row !== undefined,
    settings: {
      consecutiveCharted: s.consecutiveCharted,
      deviceDwellMin: s.deviceDwellMin,
      urgentMarginPoints: s.urgentMarginPoints,
      urgentFloorPct: s.urgentFloorPct,
      cannotVerifyMin: s.cannotVerifyMin,
      aboveOnOxygenMin: s.aboveOnOxygenMin,
      renotifyMin: s.renotifyMin,
      overdueMin: s.overdueMin,
      outreachEmails: s.outreachEmails,
      shiftStart: s.shiftStart,
      shiftEnd: s.shiftEnd,
      gasUnit: s.gasUnit,
      barometricMmHg: s.barometricMmHg,
      unitPhone: s.unitPhone,
      monitorSilentMin: s.monitorSilentMin,
      silentBelowProbeMin: s.silentBelowProbeMin,
    },
    updatedAt: row ? toIso(row.updated_at) : null,
  };
}

export async function writeUnitSettings(admin: SessionUser, code: string, input: UnitSettingsInput, now = new Date()) {
  const unit = await unitByCode(code);
  await withTransactionRetry(async (trx) => {
    const before = await unitSettingsRow(unit.id, trx);
    const row = {
      unit_id: unit.id,
      consecutive_charted: input.consecutiveCharted,
      device_dwell_min: input.deviceDwellMin,
      urgent_margin_points: input.urgentMarginPoints,
      urgent_floor_pct: input.urgentFloorPct,
      cannot_verify_min: input.cannotVerifyMin,
      above_on_oxygen_min: input.aboveOnOxygenMin,
      renotify_min: input.renotifyMin,
      gas_unit: input.gasUnit ?? before?.gas_unit ?? DEFAULT_UNIT_SETTINGS.gasUnit,
      barometric_mmhg: input.barometricMmHg ?? before?.barometric_mmhg ?? DEFAULT_UNIT_SETTINGS.barometricMmHg,
      overdue_min: input.overdueMin,
      outreach_emails: input.outreachEmails.join(', '),
      unit_phone: input.unitPhone ?? null,
      monitor_silent_min: input.monitorSilentMin,
      silent_below_probe_min: input.silentBelowProbeMin,
      updated_by: admin.id,
      updated_at: now,
      shift_start: input.shiftStart ?? before?.shift_start ?? DEFAULT_UNIT_SETTINGS.shiftStart,
      shift_end: input.shiftEnd ?? before?.shift_end ?? DEFAULT_UNIT_SETTINGS.shiftEnd,
    };
    await upsertUnitSettings(trx, row);
    await writeAudit(trx, {
      actorId: admin.id,
      action: 'unit.settings',
      entity: 'unit',
      entityId: unit.id,
      before: before ?? null,
      after: row,
      at: now,
    });
  });
  return readUnitSettings(admin, code);
}
