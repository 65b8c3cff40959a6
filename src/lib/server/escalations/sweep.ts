/**
 * The periodic sweep: raises what time alone makes due, re-notifies unclaimed escalations and
 * notes patients back in band. Safe on any number of instances: each patient and each escalation
 * is claimed with a row lock (SKIP LOCKED), and one open escalation per kind is a unique index.
 */
import { renotifyDue } from '../../escalations/decide.ts';
import { settingsFromRow } from '../../units/settings.ts';
import { db } from '../queries/db.ts';
import { lockUnclaimedForRenotify, patientsToSweep, tryLockPatient, insertEvent } from '../queries/escalations.ts';
import { patientContext, recentReadingsOf } from '../queries/escalation-context.ts';
import { toReading } from '../charting/readings.ts';
import { CHARTED_LOOKBACK_MIN, DEVICE_LOOKBACK_MIN } from '../board/board.ts';
import { checkPatientEscalations, notify } from './engine.ts';

export interface SweepResult { patientsChecked: number; patientsSkipped: number; actions: number; renotified: number }

export async function runSweep(now = new Date()): Promise<SweepResult> {
  const result: SweepResult = { patientsChecked: 0, patientsSkipped: 0, actions: 0, renotified: 0 };
  const ids = await patientsToSweep(new Date(now.getTime() - CHARTED_LOOKBACK_MIN * 60_000));
  for (const id of ids) {
    await db().transaction(async (trx) => {
      if (!(await tryLockPatient(trx, id))) {
        result.patientsSkipped += 1; // another instance is on it
        return;
      }
      result.patientsChecked += 1;
      result.actions += (await checkPatientEscalations(trx, id, now)).length;
    });
  }
  result.renotified = await renotifyUnclaimed(now);
  return result;
}

/** Re-notifies unclaimed below-band escalations whose unit's re-notify time has passed (optionally one unit only). */
export async function renotifyUnclaimed(now: Date, onlyUnitId?: number): Promise<number> {
  return db().transaction(async (trx) => {
    let count = 0;
    for (const esc of await lockUnclaimedForRenotify(trx, onlyUnitId)) {
      const ctx = await patientContext(trx, esc.patient_id);
      const settings = settingsFromRow(ctx?.settings ?? undefined);
      if (!renotifyDue(esc.last_notified_at ? new Date(esc.last_notified_at).getTime() : null, new Date(esc.raised_at).getTime(), settings.renotifyMin, now.getTime())) continue;
      if (!ctx) {
        await insertEvent(trx, { escalation_id: esc.id, type: 'renotified', actor_id: null, at: now, detail: { mailed: false, reason: 'Patient no longer in a bed' } });
        continue;
      }
      const rows = await recentReadingsOf(trx, esc.patient_id, new Date(now.getTime() - DEVICE_LOOKBACK_MIN * 60_000), new Date(now.getTime() - CHARTED_LOOKBACK_MIN * 60_000));
      const evidence = (typeof esc.evidence === 'string' ? JSON.parse(esc.evidence) : esc.evidence) as { nadir?: number | null; rule?: string | null };
      await notify(trx, esc, ctx, settings, rows.map(toReading), `esc:${esc.id}:renotify:${esc.notify_count}`, 'renotified', now, evidence.nadir ?? null, evidence.rule ?? null);
      count += 1;
    }
    return count;
  });
}
