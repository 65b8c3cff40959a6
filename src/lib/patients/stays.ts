/** Bed stays as time spans: which stay a moment falls in. Pure. */
export interface StaySpan {
  started_at: Date | string;
  ended_at: Date | string | null;
}

/**
 * The stay that holds instant `t` (ms): started at or before it, ended after it. An open stay runs
 * until `openUntil` (default: for ever; a trend file may pass "now plus a little slack").
 */
export function stayAt<S extends StaySpan>(stays: readonly S[], t: number, openUntil = Infinity): S | undefined {
  return stays.find(
    (s) =>
      new Date(s.started_at).getTime() <= t && t < (s.ended_at === null ? openUntil : new Date(s.ended_at).getTime()),
  );
}
