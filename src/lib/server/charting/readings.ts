/** Database rows → the computation modules' Reading and BandOrder shapes. */
import type { BandOrder, OxygenDevice, Reading } from '../../oxygenation/types.ts';
import type { ReadingRow } from '../queries/observations.ts';
import type { OrderRow } from '../queries/orders.ts';

export function toReading(r: ReadingRow): Reading {
  return {
    at: new Date(r.taken_at).getTime(), spo2: r.spo2 === null ? null : Number(r.spo2), heartRate: r.heart_rate,
    fio2: r.fio2 === null ? null : Number(r.fio2), fio2Estimated: Boolean(r.fio2_estimated), device: (r.device as OxygenDevice | null) ?? null,
    trace: r.trace, perfusionIndex: r.perfusion_index === null ? null : Number(r.perfusion_index), source: r.source,
  };
}

/** Orders oldest first, as the computations expect. */
export function toBandOrders(orders: OrderRow[]): BandOrder[] {
  return orders
    .map((o) => ({ from: new Date(o.ordered_at).getTime(), low: o.low, high: o.high }))
    .sort((a, b) => a.from - b.from);
}
