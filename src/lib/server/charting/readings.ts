/** Database rows → the computation modules' Reading and BandOrder shapes. */
import type { ChartedObs } from '~/lib/charting/charted-obs.ts';
import { asConsciousness } from '~/lib/oxygenation/news2.ts';
import type { BandOrder, OxygenDevice, Reading } from '~/lib/oxygenation/types.ts';
import type { ChartedObsRow, ReadingRow } from '~/lib/server/queries/observations.ts';
import type { OrderRow } from '~/lib/server/queries/orders.ts';

/** Device readings: enough for the dwell, cannot-verify and above-on-oxygen windows and a state duration. */
export const DEVICE_LOOKBACK_MIN = 60;
/** Charted obs are hourly: look back far enough to see the last few in a row. */
export const CHARTED_LOOKBACK_MIN = 6 * 60;

/** The "recent readings" window the board, the escalation engine and the sweep all judge from. */
export function recentWindow(nowMs: number): { device: Date; charted: Date } {
  return {
    device: new Date(nowMs - DEVICE_LOOKBACK_MIN * 60_000),
    charted: new Date(nowMs - CHARTED_LOOKBACK_MIN * 60_000),
  };
}

/** Rows of many patients (ordered by patient, then time) → each patient's readings. */
export function readingsByPatient(rows: (ReadingRow & { patient_id: number })[]): Map<number, Reading[]> {
  const out = new Map<number, Reading[]>();
  for (const row of rows) {
    let list = out.get(row.patient_id);
    if (!list) {
      list = [];
      out.set(row.patient_id, list);
    }
    list.push(toReading(row));
  }
  return out;
}

export function toReading(r: ReadingRow): Reading {
  return {
    at: new Date(r.taken_at).getTime(),
    spo2: r.spo2 === null ? null : Number(r.spo2),
    heartRate: r.heart_rate,
    fio2: r.fio2 === null ? null : Number(r.fio2),
    fio2Estimated: Boolean(r.fio2_estimated),
    device: (r.device as OxygenDevice | null) ?? null,
    trace: r.trace,
    perfusionIndex: r.perfusion_index === null ? null : Number(r.perfusion_index),
    source: r.source,
  };
}

/** The newest charted obs row → the one shape the board, bed chart and mail compute NEWS2 from. */
export function toChartedObs(r: ChartedObsRow): ChartedObs {
  return {
    at: new Date(r.taken_at).getTime(),
    spo2: r.spo2 === null ? null : Number(r.spo2),
    heartRate: r.heart_rate,
    respRate: r.resp_rate,
    fio2: r.fio2 === null ? null : Number(r.fio2),
    fio2Estimated: Boolean(r.fio2_estimated),
    device: (r.device as OxygenDevice | null) ?? null,
    systolic: r.systolic,
    temperature: r.temperature === null ? null : Number(r.temperature),
    consciousness: asConsciousness(r.consciousness),
  };
}

/** Orders oldest first, as the computations expect. */
export function toBandOrders(orders: OrderRow[]): BandOrder[] {
  return orders
    .map((o) => ({ from: new Date(o.ordered_at).getTime(), low: o.low, high: o.high }))
    .sort((a, b) => a.from - b.from);
}
