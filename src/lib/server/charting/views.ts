/** Database rows → the JSON shapes of src/lib/charting/api-types.ts. */
import { toIso } from '~/lib/time/iso.ts';
import type { ObsView, OrderView, StayView, PatientSummary } from '~/lib/charting/api-types.ts';
import { obsNotices } from '~/lib/charting/obs-input.ts';
import { asConsciousness } from '~/lib/oxygenation/news2.ts';
import { patientLabel } from '~/lib/patients/label.ts';
import type { OxygenDevice } from '~/lib/oxygenation/types.ts';
import type { ObservationListRow } from '~/lib/server/queries/observations.ts';
import type { OrderRow } from '~/lib/server/queries/orders.ts';
import type { PatientRow, StayRow } from '~/lib/server/queries/patients.ts';

const num = (v: string | number | null | undefined) => (v === null || v === undefined ? null : Number(v));

export function orderView(o: OrderRow): OrderView {
  return {
    id: o.id,
    low: o.low,
    high: o.high,
    news2Scale: Number(o.news2_scale) as 1 | 2,
    preset: o.preset,
    reason: o.reason,
    scaleReason: o.scale_reason,
    orderedAt: toIso(o.ordered_at)!,
    orderedBy: o.ordered_by_name,
    supersedesId: o.supersedes_id,
    scale2Basis: o.scale2_basis ?? null,
  };
}

export function stayView(s: StayRow): StayView {
  return {
    id: s.id,
    bedId: s.bed_id,
    bedLabel: s.bed_label,
    unitCode: s.unit_code,
    unitName: s.unit_name,
    startedAt: toIso(s.started_at)!,
    endedAt: toIso(s.ended_at),
    endReason: s.end_reason,
    startedBy: s.started_by_name,
    endedBy: s.ended_by_name,
  };
}

export function dateOnly(d: Date | string): string {
  // DATE columns arrive as a Date at UTC midnight (pool timezone 'Z').
  return typeof d === 'string' ? d.slice(0, 10) : d.toISOString().slice(0, 10);
}

export function patientSummary(
  p: PatientRow,
  latestStay: StayRow | undefined,
  latestOrder: OrderRow | undefined,
): PatientSummary {
  const open = latestStay && latestStay.ended_at === null ? latestStay : undefined;
  return {
    id: p.id,
    mrn: p.mrn,
    givenName: p.given_name,
    familyName: p.family_name,
    label: patientLabel(p.given_name, p.family_name, p.mrn),
    dateOfBirth: dateOnly(p.date_of_birth),
    co2RetentionRisk: Boolean(p.co2_retention_risk),
    bed: open ? { id: open.bed_id, label: open.bed_label, unitCode: open.unit_code, unitName: open.unit_name } : null,
    admittedAt: open ? toIso(open.started_at) : null,
    band: latestOrder ? orderView(latestOrder) : null,
  };
}

export function obsView(o: ObservationListRow): ObsView {
  const spo2 = o.spo2 === null ? null : Number(o.spo2);
  return {
    id: Number(o.id),
    takenAt: toIso(o.taken_at)!,
    source: o.source,
    spo2,
    heartRate: o.heart_rate,
    respRate: o.resp_rate,
    fio2: num(o.fio2),
    fio2Estimated: Boolean(o.fio2_estimated),
    device: (o.device as OxygenDevice | null) ?? null,
    flowLpm: num(o.flow_lpm),
    trace: o.trace,
    perfusionIndex: num(o.perfusion_index),
    probeSite: o.probe_site,
    systolic: o.systolic,
    temperature: num(o.temperature),
    consciousness: asConsciousness(o.consciousness),
    note: o.note,
    status: o.status,
    replacesId: o.replaces_id === null ? null : Number(o.replaces_id),
    replacedById: o.replaced_by_id === null ? null : Number(o.replaced_by_id),
    statusReason: o.status_reason,
    statusBy: o.status_by_name,
    statusAt: toIso(o.status_at),
    recordedBy: o.recorded_by_name,
    recordedAt: toIso(o.recorded_at)!,
    notices: obsNotices({ spo2: spo2 ?? undefined }),
  };
}
