/**
 * The escalation engine for one patient: runs the computation modules' checks on the patient's
 * recent readings and applies what `decideEscalations` says, inside the caller's transaction —
 * the escalation, its timeline event, the audit entry and the outbox mail commit together or not at all.
 */
import type { Knex } from 'knex';
import type { Reading } from '~/lib/oxygenation/index.ts';
import { EMAILED_KINDS, type EscalationAction } from '~/lib/escalations/decide.ts';
import { judgePatient, lastClosedRunStarts, toOpenEscalation } from '~/lib/escalations/judge.ts';
import { settingsFromRow, type UnitSettings } from '~/lib/units/settings.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import {
  insertEscalation,
  insertEvent,
  lastClosedRunStartsFor,
  openEscalationsOf,
  updateEscalation,
  type EscalationRow,
} from '~/lib/server/queries/escalations.ts';
import { enqueueMail } from '~/lib/server/queries/outbox.ts';
import { patientContext, type PatientContext } from '~/lib/server/queries/escalation-context.ts';
import { recentReadings } from '~/lib/server/queries/recent-readings.ts';
import { recentWindow, toReading } from '~/lib/server/charting/readings.ts';
import { escalationMail } from './mail-input.ts';
import { publicOrigin } from './claim-links.ts';

export { publicOrigin };

/** Runs the checks for a patient whose row the caller's transaction has locked. */
export async function checkPatientEscalations(
  trx: Knex.Transaction,
  patientId: number,
  now: Date,
): Promise<EscalationAction[]> {
  const ctx = await patientContext(trx, patientId);
  if (!ctx) return []; // not in a bed: nothing to watch
  const settings = settingsFromRow(ctx.settings ?? undefined);
  const nowMs = now.getTime();
  const all = (await recentReadings([patientId], recentWindow(nowMs), trx)).map(toReading);
  const openRows = await openEscalationsOf(trx, patientId);
  const { readings, band, concerns, state, actions } = judgePatient({
    readings: all,
    band: ctx.band ? { low: ctx.band.low, high: ctx.band.high, orderedAt: ctx.band.orderedAt.getTime() } : null,
    settings,
    open: openRows.map(toOpenEscalation),
    lastClosedRunStart: lastClosedRunStarts(await lastClosedRunStartsFor([patientId], trx)),
    now: nowMs,
  });
  for (const action of actions) {
    switch (action.type) {
      case 'raise': {
        const below = action.kind === 'below_band' ? concerns.belowBand : null;
        const evidence = {
          rule: below?.rule ?? null,
          nadir: below?.nadir ?? null,
          urgentReasons: below?.urgentReasons ?? [],
          band,
          lastReadings: readings
            .slice(-6)
            .map((r) => ({ at: r.at, spo2: r.spo2, trace: r.trace, heartRate: r.heartRate ?? null, source: r.source })),
        };
        const id = await insertEscalation(trx, {
          patient_id: patientId,
          unit_id: ctx.unitId,
          bed_id: ctx.bedId,
          kind: action.kind,
          severity: action.severity,
          state: 'raised',
          raised_at: now,
          run_start: new Date(action.runStart),
          run_end: new Date(action.runEnd),
          evidence: JSON.stringify(evidence),
          last_notified_at: null,
          notify_count: 0,
        });
        await insertEvent(trx, {
          escalation_id: id,
          type: 'raised',
          actor_id: null,
          at: now,
          detail: { severity: action.severity, runStart: action.runStart, runEnd: action.runEnd },
        });
        await writeAudit(trx, {
          actorId: null,
          action: 'escalation.raise',
          entity: 'escalation',
          entityId: id,
          after: { patientId, kind: action.kind, severity: action.severity },
          at: now,
        });
        if (EMAILED_KINDS.includes(action.kind)) {
          await notify(trx, {
            esc: {
              id,
              kind: action.kind,
              severity: action.severity,
              run_start: new Date(action.runStart),
              run_end: new Date(action.runEnd),
              notify_count: 0,
            },
            ctx,
            settings,
            readings,
            key: `esc:${id}:raised`,
            eventType: 'notified',
            now,
            nadir: below?.nadir ?? null,
            rule: below?.rule ?? null,
          });
        }
        break;
      }
      case 'upgrade': {
        const row = openRows.find((e) => e.id === action.id)!;
        await updateEscalation(trx, action.id, { severity: 'urgent' });
        await insertEvent(trx, {
          escalation_id: action.id,
          type: 'severity_raised',
          actor_id: null,
          at: now,
          detail: { from: row.severity, to: 'urgent', reasons: concerns.belowBand?.urgentReasons ?? [] },
        });
        await writeAudit(trx, {
          actorId: null,
          action: 'escalation.severity_raised',
          entity: 'escalation',
          entityId: action.id,
          before: { severity: row.severity },
          after: { severity: 'urgent' },
          at: now,
        });
        if (row.state === 'raised' || row.state === 'claimed') {
          await notify(trx, {
            esc: { ...row, severity: 'urgent' },
            ctx,
            settings,
            readings,
            key: `esc:${action.id}:urgent`,
            eventType: 'notified',
            now,
            nadir: concerns.belowBand?.nadir ?? null,
            rule: concerns.belowBand?.rule ?? null,
          });
        }
        break;
      }
      case 'auto_close': {
        await updateEscalation(trx, action.id, {
          state: 'closed',
          closed_at: now,
          outcome: 'condition_cleared',
          close_note: action.reason,
        });
        await insertEvent(trx, {
          escalation_id: action.id,
          type: 'closed',
          actor_id: null,
          at: now,
          detail: { outcome: 'condition_cleared', note: action.reason },
        });
        await writeAudit(trx, {
          actorId: null,
          action: 'escalation.auto_close',
          entity: 'escalation',
          entityId: action.id,
          after: { outcome: 'condition_cleared' },
          at: now,
        });
        break;
      }
      case 'back_in_band': {
        await updateEscalation(trx, action.id, { back_in_band_at: now });
        await insertEvent(trx, {
          escalation_id: action.id,
          type: 'back_in_band',
          actor_id: null,
          at: now,
          detail: { inBandSinceMin: state.sinceMin },
        });
        break;
      }
    }
  }
  return actions;
}

export interface NotifyOptions {
  esc: Pick<EscalationRow, 'id' | 'kind' | 'severity' | 'run_start' | 'run_end' | 'notify_count'> & {
    last_notified_at?: Date | null;
  };
  ctx: PatientContext;
  settings: UnitSettings;
  /** Recent readings, oldest first: the mail shows the last few and the oxygen in use. */
  readings: Reading[];
  /** Idempotency key of the outbox row (one mail per key, whatever retries). */
  key: string;
  eventType: 'notified' | 'renotified';
  now: Date;
  nadir: number | null;
  rule: string | null;
}

/** Queues the mail for an escalation (first notice, urgent upgrade or reminder) and records it. */
export async function notify(
  trx: Knex.Transaction,
  { esc, ctx, settings, readings, key, eventType, now, nadir, rule }: NotifyOptions,
): Promise<void> {
  const renotify = eventType === 'renotified' ? esc.notify_count : 0;
  const mail = await escalationMail(trx, {
    esc,
    ctx,
    settings,
    readings,
    renotify,
    previousNoticeAt: esc.last_notified_at ?? null,
    nadir,
    rule,
    now,
  });
  const to = settings.outreachEmails;
  if (to.length === 0) {
    // No list configured: the escalation stands on the board and queue; the timeline says why no mail went.
    await insertEvent(trx, {
      escalation_id: esc.id,
      type: eventType,
      actor_id: null,
      at: now,
      detail: { mailed: false, reason: 'No outreach e-mail addresses are set for this unit' },
    });
  } else {
    await enqueueMail(trx, {
      idempotency_key: key,
      escalation_id: esc.id,
      to_addresses: to.join(', '),
      subject: mail.subject,
      text_body: mail.text,
      html_body: mail.html,
      created_at: now,
    });
    await insertEvent(trx, {
      escalation_id: esc.id,
      type: eventType,
      actor_id: null,
      at: now,
      detail: { mailed: true, to, key },
    });
  }
  await updateEscalation(trx, esc.id, { last_notified_at: now, notify_count: esc.notify_count + 1 });
}
