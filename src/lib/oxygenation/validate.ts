import { ComputationInputError, requireFinite } from './errors';
import type { Band, BandOrder, ReadingSource, TimeWindow } from './types';

/** Band orders flattened into typed arrays so the hot loops read numbers, not objects. */
export interface OrderColumns {
  from: Float64Array;
  low: Float64Array;
  high: Float64Array;
}

/** What every judgement at a moment checks first: a finite `now`, and a sound band when there is one. */
export function validateMoment(band: Band | null, now: number): void {
  requireFinite('now', now);
  if (band !== null) validateBand(band);
}

export function validateBand(band: Band, fieldName = 'band'): Band {
  const { low, high } = band;
  if (!(low >= 0 && low <= 100)) throw new ComputationInputError(`${fieldName}.low`, 'must be between 0 and 100', low);
  if (!(high >= 0 && high <= 100))
    throw new ComputationInputError(`${fieldName}.high`, 'must be between 0 and 100', high);
  if (low > high) throw new ComputationInputError(`${fieldName}.low`, 'must not exceed high', low);
  return band;
}

export function orderColumns(orders: readonly BandOrder[]): OrderColumns {
  if (!Array.isArray(orders)) throw new ComputationInputError('orders', 'must be an array', orders);
  const n = orders.length;
  const cols: OrderColumns = { from: new Float64Array(n), low: new Float64Array(n), high: new Float64Array(n) };
  let prev = -Infinity;
  for (let i = 0; i < n; i++) {
    const o = orders[i]!;
    if (!(o.from >= prev) || !Number.isFinite(o.from)) {
      throw new ComputationInputError(`orders[${i}].from`, 'must be a finite time, sorted ascending', o.from);
    }
    validateBand(o, `orders[${i}]`);
    prev = o.from;
    cols.from[i] = o.from;
    cols.low[i] = o.low;
    cols.high[i] = o.high;
  }
  return cols;
}

export function validateWindow(window: TimeWindow): TimeWindow {
  if (!Number.isFinite(window.from))
    throw new ComputationInputError('window.from', 'must be a finite time', window.from);
  if (!Number.isFinite(window.to)) throw new ComputationInputError('window.to', 'must be a finite time', window.to);
  if (window.to < window.from)
    throw new ComputationInputError('window.to', 'must not be before window.from', window.to);
  return window;
}

/** Carry-forward limit for a reading's source, in ms; throws for an unknown source. */
export function maxGapMsFor(
  source: ReadingSource,
  chartedMs: number,
  deviceMs: number,
  importMs: number,
  index: number,
): number {
  if (source === 'device') return deviceMs;
  if (source === 'charted') return chartedMs;
  if (source === 'import') return importMs;
  throw new ComputationInputError(`readings[${index}].source`, 'must be charted, device or import', source);
}

/** Throws unless `at` is finite and not before `prevAt`. */
/**
 * Checks that readings carry finite times sorted ascending, up to the first one after `now`, and
 * returns how many stand at or before `now`: every reading loop runs over `0 … count - 1`.
 */
export function sortedUpTo(readings: readonly { at: number }[], now = Infinity): number {
  let prevAt = -Infinity;
  for (let i = 0; i < readings.length; i++) {
    const at = readings[i]!.at;
    checkTime(at, prevAt, i);
    if (at > now) return i;
    prevAt = at;
  }
  return readings.length;
}

export function checkTime(at: number, prevAt: number, index: number): void {
  // `at - at === 0` is false for NaN and both infinities, so one comparison pair covers them all.
  if (!(at >= prevAt && at - at === 0)) {
    throw new ComputationInputError(`readings[${index}].at`, 'must be a finite time, sorted ascending', at);
  }
}
