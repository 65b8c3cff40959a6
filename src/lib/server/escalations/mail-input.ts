/**
 * Gathers what an escalation e-mail says (issue 10 point 7) inside the caller's transaction: readings
 * of the last minutes (so a burst seconds apart can be collapsed per minute), NEWS2 or the parameters
 * it lacks, the bedside nurse, the unit phone, and a fresh one-click claim link.
 */
import type { Knex } from 'knex';
import { news2 } from '~/lib/oxygenation/index.ts';
import { buildEscalationMail, type MailReading } from '~/lib/escalations/mail.ts';
import type { EscalationKind } from '~/lib/escalations/decide.ts';
import { patientLabel } from '~/lib/patients/label.ts';
import type { UnitSettings } from '~/lib/units/settings.ts';
import type { PatientContext } from '~/lib/server/queries/escalation-context.ts';
import { bedsideNurseName } from '~/lib/server/queries/mail-context.ts';
import { toChartedObs } from '~/lib/server/charting/readings.ts';
import { news2InputOf } from '~/lib/charting/charted-obs.ts';
import type { Reading } from '~/lib/oxygenation/index.ts';
import { issueClaimLink, publicOrigin } from './claim-links.ts';

/** Readings of this many minutes before the newest go into the mail (collapsed per minute when dense). */
const MAIL_WINDOW_MS = 10 * 60_000;

export interface MailFor {
  esc: { id: number; kind: EscalationKind; severity: 'standard' | 'urgent' | null; run_start: Date; run_end: Date };
  ctx: PatientContext;
  settings: UnitSettings;
  readings: Reading[];
  renotify: number;
  previousNoticeAt: Date | null;
  nadir: number | null;
  rule: string | null;
  now: Date;
}

export async function escalationMail(
  trx: Knex.Transaction,
  f: MailFor,
): Promise<{ subject: string; text: string; html: string }> {
  const { ctx, readings } = f;
  const lastCharted = [...readings].reverse().find((r) => r.source === 'charted');
  const oxygenFrom = [...readings].reverse().find((r) => r.fio2 !== null && r.fio2 !== undefined);
  let news: { total: number; scale: 1 | 2 } | { missing: NonNullable<ReturnType<typeof news2>['missing']> } | null =
    null;
  if (ctx.lastCharted) {
    const scale = (ctx.band?.news2Scale ?? 1) as 1 | 2;
    const n = news2(news2InputOf(toChartedObs(ctx.lastCharted)), scale);
    news = n.complete && n.total !== null ? { total: n.total, scale } : { missing: n.missing };
  }
  const newest = readings.length ? readings[readings.length - 1]!.at : 0;
  const recent = readings.filter((r) => r.at > newest - MAIL_WINDOW_MS);
  const lastReadings: MailReading[] = recent.map((r) => ({
    at: r.at,
    spo2: r.spo2,
    trace: r.trace,
    heartRate: r.heartRate ?? null,
    source: r.source,
  }));
  const claim = await issueClaimLink(trx, f.esc.id, f.now);
  return buildEscalationMail({
    hospital: ctx.hospital,
    unitName: ctx.unitName,
    bedLabel: ctx.bedLabel,
    patientLabel: patientLabel(ctx.givenName, ctx.familyName, ctx.mrn),
    timeZone: ctx.timeZone,
    kind: f.esc.kind,
    severity: f.esc.severity,
    renotify: f.renotify,
    band: ctx.band ?? { low: 0, high: 0 },
    run: {
      start: new Date(f.esc.run_start).getTime(),
      end: new Date(f.esc.run_end).getTime(),
      nadir: f.nadir,
      rule: f.rule,
    },
    lastReadings,
    oxygen: {
      fio2: oxygenFrom?.fio2 ?? null,
      fio2Estimated: Boolean(oxygenFrom?.fio2Estimated),
      device: oxygenFrom?.device ?? lastCharted?.device ?? null,
    },
    news2: news,
    link: `${publicOrigin()}/patients/${ctx.patientId}`,
    now: f.now.getTime(),
    previousNoticeAt: f.previousNoticeAt ? f.previousNoticeAt.getTime() : null,
    monitorSilentMin: f.settings.monitorSilentMin,
    bedsideNurse: await bedsideNurseName(trx, ctx.bedId),
    unitPhone: f.settings.unitPhone,
    claimLink: claim.url,
    claimLinkExpiresAt: claim.expiresAt,
  });
}
