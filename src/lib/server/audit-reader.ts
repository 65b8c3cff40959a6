/** The admin audit reader: filters in the chosen unit's time zone, pages, CSV of the filtered rows. */
import { fromZonedTime } from 'date-fns-tz';
import { CSV_LIMIT, type AuditQuery, type AuditRowView } from '~/lib/audit/reader.ts';
import { formatDateTimeSeconds } from '~/lib/time/format.ts';
import { ApiError } from './http.ts';
import {
  countAudit,
  distinctActions,
  patientIdByMrn,
  readAudit,
  zoneOfUnit,
  type AuditFilter,
} from './queries/audit-reader.ts';

async function filterFrom(q: AuditQuery) {
  const unit = await zoneOfUnit(q.unit);
  if (q.unit && !unit)
    throw new ApiError(400, 'invalid_input', `unit: there is no unit ${q.unit}.`, { unit: 'No such unit' });
  const timeZone = unit?.time_zone ?? 'UTC';
  const filter: AuditFilter = { actorId: q.actorId, action: q.action };
  if (q.patient) {
    const id = await patientIdByMrn(q.patient);
    // An unknown MRN matches nothing (not an error: the reader says "no rows").
    filter.patientId = id ?? 0;
  }
  // Whole days in the unit's zone: from 00:00 of `from` to 00:00 after `to`.
  if (q.from) filter.fromUtc = fromZonedTime(`${q.from}T00:00:00`, timeZone);
  if (q.to) filter.toUtc = fromZonedTime(`${nextDay(q.to)}T00:00:00`, timeZone);
  return { filter, timeZone, unitCode: unit?.code ?? null };
}

function nextDay(ymd: string): string {
  const d = new Date(`${ymd}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + 1);
  return d.toISOString().slice(0, 10);
}

function view(r: Awaited<ReturnType<typeof readAudit>>[number], timeZone: string): AuditRowView {
  const at = new Date(r.at).toISOString();
  return {
    id: Number(r.id),
    at,
    atLocal: formatDateTimeSeconds(at, timeZone),
    actorId: r.actor_id,
    actorName: r.actor_name,
    actorEmail: r.actor_email,
    action: r.action,
    entity: r.entity,
    entityId: r.entity_id,
    before: r.before,
    after: r.after,
  };
}

export async function auditPage(q: AuditQuery) {
  const { filter, timeZone, unitCode } = await filterFrom(q);
  const [total, rows, actions] = await Promise.all([
    countAudit(filter),
    readAudit(filter, (q.page - 1) * q.pageSize, q.pageSize),
    distinctActions(),
  ]);
  return {
    rows: rows.map((r) => view(r, timeZone)),
    total,
    page: q.page,
    pageSize: q.pageSize,
    timeZone,
    unitCode,
    actions,
  };
}

export async function auditRowsForCsv(q: AuditQuery) {
  const { filter, timeZone } = await filterFrom(q);
  const rows = await readAudit(filter, 0, CSV_LIMIT);
  return { rows: rows.map((r) => view(r, timeZone)), timeZone };
}
