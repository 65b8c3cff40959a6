/**
 * The handover sheet: one block per bed for the shift that contains `now` (unit settings give the
 * shift times), figures from the computation modules over that shift, and the newest handover note.
 * Nurses see the beds they look after unless they ask for the unit; other clinical roles the unit.
 */
import { toIso } from '~/lib/time/iso.ts';
import type {
  HandoverBed,
  HandoverNoteView,
  HandoverResponse,
  News2View,
  OxygenStateView,
} from '~/lib/reports/api-types.ts';
import {
  lowestTrusted,
  minutesBetween,
  news2At,
  oxygenCourse,
  shiftCompliance,
  type ChartedSet,
  type News2Figure,
  type OxygenState,
} from '~/lib/reports/handover.ts';
import { currentShift } from '~/lib/reports/shift.ts';
import { patientLabel } from '~/lib/patients/label.ts';
import {
  DEFAULT_COMPLIANCE_SETTINGS,
  type BandOrder,
  type OxygenDevice,
  type Reading,
} from '~/lib/oxygenation/index.ts';
import { settingsFromRow } from '~/lib/units/settings.ts';
import { boardBeds } from '~/lib/server/queries/board.ts';
import {
  chartedSetsBefore,
  escalationsForHandover,
  latestHandoverNotes,
  ordersOfPatients,
  readingsOfPatientsBetween,
  type HandoverNoteRow,
  type HandoverReadingRow,
} from '~/lib/server/queries/reports.ts';
import { unitSettingsRow } from '~/lib/server/queries/unit-settings.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { unitToShow } from '~/lib/server/units-visible.ts';

const ms = (d: Date | null) => (d === null ? null : new Date(d).getTime());
const num = (v: string | number | null) => (v === null ? null : Number(v));
const r1 = (v: number) => Math.round(v * 10) / 10;

function toReading(r: HandoverReadingRow): Reading {
  return {
    at: ms(r.taken_at)!,
    spo2: r.spo2 === null ? null : Number(r.spo2),
    heartRate: r.heart_rate,
    fio2: num(r.fio2),
    fio2Estimated: Boolean(r.fio2_estimated),
    device: (r.device as OxygenDevice | null) ?? null,
    trace: r.trace,
    perfusionIndex: num(r.perfusion_index),
    source: r.source,
  };
}

function toCharted(r: HandoverReadingRow): ChartedSet {
  return {
    at: ms(r.taken_at)!,
    spo2: r.spo2 === null ? null : Number(r.spo2),
    heartRate: r.heart_rate,
    respRate: r.resp_rate,
    fio2: num(r.fio2),
    fio2Estimated: Boolean(r.fio2_estimated),
    systolic: r.systolic,
    temperature: num(r.temperature),
    consciousness: (r.consciousness as ChartedSet['consciousness']) ?? null,
    device: (r.device as OxygenDevice | null) ?? null,
  };
}

const oxygenView = (s: OxygenState | null): OxygenStateView | null =>
  s ? { device: s.device, fio2: s.fio2, fio2Estimated: s.fio2Estimated, at: toIso(s.at) } : null;
const newsView = (n: News2Figure | null): News2View | null =>
  n ? { total: n.total, complete: n.complete, missing: n.missing, response: n.response, at: toIso(n.at) } : null;

export function noteView(n: HandoverNoteRow): HandoverNoteView {
  return {
    id: n.id,
    version: n.version,
    note: n.note,
    writtenBy: n.written_by_name,
    writtenAt: new Date(n.written_at).toISOString(),
  };
}

function group<T extends { patient_id: number }>(rows: T[]): Map<number, T[]> {
  const m = new Map<number, T[]>();
  for (const r of rows) {
    if (!m.has(r.patient_id)) m.set(r.patient_id, []);
    m.get(r.patient_id)!.push(r);
  }
  return m;
}

export async function handoverSheet(
  user: SessionUser,
  opts: { unit?: string; scope?: 'mine' | 'unit' },
  now = new Date(),
): Promise<HandoverResponse> {
  const { unit, units } = await unitToShow(user, opts.unit);
  const scope = opts.scope ?? (user.role === 'nurse' ? 'mine' : 'unit');
  const nowMs = now.getTime();
  const settings = settingsFromRow(await unitSettingsRow(unit.id));
  const shift = currentShift(nowMs, unit.time_zone, settings.shiftStart, settings.shiftEnd);
  const to = Math.min(nowMs, shift.to);

  const allBeds = await boardBeds(unit.id);
  const beds = scope === 'mine' ? allBeds.filter((b) => b.nurse_id === user.id) : allBeds;
  const ids = beds.flatMap((b) => (b.patient_id === null ? [] : [b.patient_id]));
  const lookBack = DEFAULT_COMPLIANCE_SETTINGS.chartedMaxGapMin * 60_000;
  const [readingRows, orderRows, startSets, escalationRows, notes] = await Promise.all([
    readingsOfPatientsBetween(ids, new Date(shift.from - lookBack), new Date(nowMs + 1)),
    ordersOfPatients(ids),
    chartedSetsBefore(ids, new Date(shift.from)),
    escalationsForHandover(ids, new Date(shift.from)),
    latestHandoverNotes(ids),
  ]);
  const readingsBy = group(readingRows);
  const ordersBy = group(orderRows);
  const startBy = group(startSets);
  const escBy = group(escalationRows);
  const noteBy = new Map(notes.map((n) => [n.patient_id, n]));

  const blocks: HandoverBed[] = beds.map((b) => {
    if (b.patient_id === null) return { bedId: b.bed_id, bedLabel: b.bed_label, patient: null };
    const pid = b.patient_id;
    const rows = readingsBy.get(pid) ?? [];
    const readings = rows.map(toReading);
    const orders = ordersBy.get(pid) ?? [];
    const bandOrders: BandOrder[] = orders.map((o) => ({ from: ms(o.ordered_at)!, low: o.low, high: o.high }));
    const current = orders[orders.length - 1];
    const atStart = [...orders].reverse().find((o) => ms(o.ordered_at)! <= shift.from);
    const charted = [...(startBy.get(pid) ?? []), ...rows.filter((r) => r.source === 'charted')].map(toCharted);
    const lastCharted = charted.length ? Math.max(...charted.map((c) => c.at)) : null;
    const sinceCharted = lastCharted === null ? null : (nowMs - lastCharted) / 60_000;
    const c = shiftCompliance(readings, bandOrders, shift.from, to);
    const esc = escBy.get(pid) ?? [];
    const note = noteBy.get(pid);
    return {
      bedId: b.bed_id,
      bedLabel: b.bed_label,
      patient: {
        id: pid,
        label: patientLabel(b.given_name!, b.family_name!, b.mrn!),
        nurse: b.nurse_name,
        band: current
          ? { low: current.low, high: current.high, news2Scale: Number(current.news2_scale) as 1 | 2 }
          : null,
        bandChanges: orders
          .filter((o) => ms(o.ordered_at)! > shift.from && ms(o.ordered_at)! <= nowMs)
          .map((o) => ({
            low: o.low,
            high: o.high,
            news2Scale: Number(o.news2_scale) as 1 | 2,
            at: toIso(ms(o.ordered_at)!),
            by: o.ordered_by_name,
            reason: o.reason,
          })),
        compliance: {
          inBandMin: r1(c.inBandMin),
          belowMin: r1(c.belowMin),
          untrustedMin: r1(c.untrustedMin),
          timeInBandPct: c.timeInBandPct === null ? null : r1(c.timeInBandPct),
          windowMin: r1(c.windowMin),
        },
        lowest: (() => {
          const l = lowestTrusted(readings, shift.from, to);
          return l ? { spo2: l.spo2, at: toIso(l.at) } : null;
        })(),
        escalations: esc
          .filter((e) => ms(e.raised_at)! >= shift.from)
          .map((e) => ({
            id: e.id,
            kind: e.kind,
            severity: e.severity,
            state: e.state,
            raisedAt: toIso(ms(e.raised_at)!),
            outcome: e.outcome,
            minutesToClaim: minutesBetween(ms(e.raised_at)!, ms(e.claimed_at)),
            minutesToClose: e.claimed_at ? minutesBetween(ms(e.claimed_at)!, ms(e.closed_at)) : null,
          })),
        openPrompts: esc
          .filter((e) => e.state !== 'closed' && e.kind !== 'below_band')
          .map((e) => ({ kind: e.kind as 'probe_check' | 'wean_prompt', raisedAt: toIso(ms(e.raised_at)!) })),
        oxygen: (() => {
          const o = oxygenCourse(readings, shift.from, nowMs + 1);
          return {
            atStart: oxygenView(o.atStart),
            now: oxygenView(o.now),
            changes: o.changes.map((x) => oxygenView(x)!),
          };
        })(),
        news2Now: newsView(news2At(charted, nowMs, current ? (Number(current.news2_scale) as 1 | 2) : 1)),
        news2AtStart: newsView(news2At(charted, shift.from, atStart ? (Number(atStart.news2_scale) as 1 | 2) : 1)),
        lastChartedAt: lastCharted === null ? null : toIso(lastCharted),
        overdueMin: sinceCharted !== null && sinceCharted > settings.overdueMin ? Math.floor(sinceCharted) : null,
        note: note ? noteView(note) : null,
      },
    };
  });

  return {
    unit: { code: unit.code, name: unit.name, timeZone: unit.time_zone },
    units: units.map((u) => ({ code: u.code, name: u.name })),
    scope,
    shift: {
      from: toIso(shift.from),
      to: toIso(shift.to),
      kind: shift.kind,
      start: settings.shiftStart,
      end: settings.shiftEnd,
    },
    generatedAt: now.toISOString(),
    settings: { overdueMin: settings.overdueMin },
    beds: blocks,
  };
}
