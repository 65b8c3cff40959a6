/**
 * The periodic sweep: raises what time alone makes due, re-notifies unclaimed escalations and
 * notes patients back in band. Safe on any number of instances: each patient and each escalation
 * is claimed with a row lock (SKIP LOCKED), and one open escalation per kind is a unique index.
 */
import { renotifyDue } from '~/lib/escalations/decide.ts';
import { judgePatient, lastClosedRunStarts, toOpenEscalation } from '~/lib/escalations/judge.ts';
import { recentReadings } from '~/lib/server/queries/recent-readings.ts';
import { settingsFromRow } from '~/lib/units/settings.ts';
import { db } from '~/lib/server/queries/db.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import {
  insertEvent,
  lastClosedRunStartsFor,
  lockUnclaimedForRenotify,
  openForPatients,
  patientsToSweep,
  tryLockPatient,
} from '~/lib/server/queries/escalations.ts';
import { patientContext, sweepContexts } from '~/lib/server/queries/escalation-context.ts';
import { readingsByPatient, recentWindow, toReading } from '~/lib/server/charting/readings.ts';
import { checkPatientEscalations, notify } from './engine.ts';

export interface SweepResult {
  patientsChecked: number;
  patientsSkipped: number;
  actions: number;
  renotified: number;
}

export async function runSweep(now = new Date()): Promise<SweepResult> {
  const result: SweepResult = { patientsChecked: 0, patientsSkipped: 0, actions: 0, renotified: 0 };
  const nowMs = now.getTime();
  const window = recentWindow(nowMs);
  const ids = await patientsToSweep(window.charted);
  // First pass, read-only and batched: which patients would change at all? Only those get a
  // transaction and a row lock, where the engine decides again on fresh data.
  const due = await patientsWithActions(ids, nowMs, window);
  result.patientsChecked = ids.length;
  for (const id of due) {
    await withTransactionRetry(async (trx) => {
      if (!(await tryLockPatient(trx, id))) {
        result.patientsSkipped += 1; // another instance is on it
        return;
      }
      result.actions += (await checkPatientEscalations(trx, id, now)).length;
    });
  }
  result.renotified = await renotifyUnclaimed(now);
  return result;
}

async function patientsWithActions(
  ids: number[],
  nowMs: number,
  window: { device: Date; charted: Date },
): Promise<number[]> {
  if (ids.length === 0) return [];
  const [contexts, readings, open, closed] = await Promise.all([
    sweepContexts(db(), ids),
    recentReadings(ids, window),
    openForPatients(ids),
    lastClosedRunStartsFor(ids),
  ]);
  const readingsBy = readingsByPatient(readings);
  const due: number[] = [];
  for (const c of contexts) {
    const { actions } = judgePatient({
      readings: readingsBy.get(c.patientId) ?? [],
      band: c.band ? { low: c.band.low, high: c.band.high, orderedAt: c.band.orderedAt.getTime() } : null,
      settings: settingsFromRow(c.settings ?? undefined),
      open: open.filter((e) => e.patient_id === c.patientId).map(toOpenEscalation),
      lastClosedRunStart: lastClosedRunStarts(closed.filter((x) => x.patient_id === c.patientId)),
      now: nowMs,
    });
    if (actions.length > 0) due.push(c.patientId);
  }
  return due;
}

/** Re-notifies unclaimed below-band escalations whose unit's re-notify time has passed (optionally one unit only). */
export async function renotifyUnclaimed(now: Date, onlyUnitId?: number): Promise<number> {
  return withTransactionRetry(async (trx) => {
    let count = 0;
    // No unit re-notifies sooner than 5 min (the settings' lower bound).
    for (const esc of await lockUnclaimedForRenotify(trx, onlyUnitId, 50, new Date(now.getTime() - 5 * 60_000))) {
      const ctx = await patientContext(trx, esc.patient_id);
      const settings = settingsFromRow(ctx?.settings ?? undefined);
      if (
        !renotifyDue(
          esc.last_notified_at ? new Date(esc.last_notified_at).getTime() : null,
          new Date(esc.raised_at).getTime(),
          settings.renotifyMin,
          now.getTime(),
        )
      )
        continue;
      if (!ctx) {
        await insertEvent(trx, {
          escalation_id: esc.id,
          type: 'renotified',
          actor_id: null,
          at: now,
          detail: { mailed: false, reason: 'Patient no longer in a bed' },
        });
        continue;
      }
      const rows = await recentReadings([esc.patient_id], recentWindow(now.getTime()), trx);
      const evidence = (typeof esc.evidence === 'string' ? JSON.parse(esc.evidence) : esc.evidence) as {
        nadir?: number | null;
        rule?: string | null;
      };
      await notify(trx, {
        esc,
        ctx,
        settings,
        readings: rows.map(toReading),
        key: `esc:${esc.id}:renotify:${esc.notify_count}`,
        eventType: 'renotified',
        now,
        nadir: evidence.nadir ?? null,
        rule: evidence.rule ?? null,
      });
      count += 1;
    }
    return count;
  });
}
