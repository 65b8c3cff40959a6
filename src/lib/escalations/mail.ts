/**
 * The escalation e-mail: minimum necessary patient data (initials and last 3 of the MRN only),
 * the band, the run, the last readings, oxygen, NEWS2 (or what it lacks), who is at the bedside and
 * how to call the unit, a one-click claim link, the bed chart link, and the caution.
 *
 * Read on a phone first: HTML with a viewport meta and one column (no side-by-side blocks), and a
 * plain-text part with the same words. Readings carry seconds; a run of readings seconds apart is
 * collapsed to one line per minute with its lowest and highest SpO₂, so six rows never read
 * "06:08 87 %" six times. Times come from the one formatting module (unit zone, 24-hour).
 */
import { DEVICE_LABELS } from '~/lib/charting/obs-input.ts';
import type { News2Parameter } from '~/lib/oxygenation/news2.ts';
import type { OxygenDevice, TraceQuality } from '~/lib/oxygenation/types.ts';
import { formatClock, formatClockSeconds, formatWhen } from '~/lib/time/format.ts';
import { KIND_LABELS, type EscalationKind } from './decide.ts';

export interface MailReading {
  at: number;
  spo2: number | null;
  trace: TraceQuality;
  heartRate: number | null;
  source: string;
}

export interface EscalationMailInput {
  hospital: string;
  unitName: string;
  bedLabel: string;
  patientLabel: string;
  timeZone: string;
  kind: EscalationKind;
  severity: 'standard' | 'urgent' | null;
  renotify: number;
  band: { low: number; high: number };
  run: { start: number; end: number; nadir: number | null; rule: string | null };
  /** The recent readings, oldest first (the mail shows the newest few, or the newest minutes collapsed). */
  lastReadings: MailReading[];
  oxygen: { fio2: number | null; fio2Estimated: boolean; device: OxygenDevice | null };
  /** The NEWS2 total when every parameter was charted; otherwise the parameters it lacks. */
  news2: { total: number; scale: 1 | 2 } | { missing: News2Parameter[] } | null;
  link: string;
  /** When this mail is written; the previous notice's time (reminders); the unit's silence limit. */
  now?: number;
  previousNoticeAt?: number | null;
  monitorSilentMin?: number;
  bedsideNurse?: string | null;
  unitPhone?: string | null;
  /** One-click claim link (signed, single use, expiring); null when none could be made. */
  claimLink?: string | null;
  claimLinkExpiresAt?: number | null;
}

export const MAIL_CAUTION =
  'Decision support only: follow local protocols and the treating team. Pulse oximetry can over-read in people with darker skin and in poor perfusion; confirm doubtful readings with an arterial blood gas.';

export const NEWS2_PARAMETER_WORDS: Record<News2Parameter, string> = {
  respRate: 'respiratory rate',
  spo2: 'SpO₂',
  airOrOxygen: 'air or oxygen',
  systolic: 'systolic BP',
  pulse: 'pulse',
  consciousness: 'consciousness',
  temperature: 'temperature',
};

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** Readings shown one by one when there are this few in the last minutes; more are collapsed per minute. */
const SHOW_EACH_UP_TO = 6;
const MINUTES_SHOWN = 6;

export interface ReadingLine {
  time: string;
  spo2: string;
  detail: string;
}

/**
 * The reading lines of the mail: each of the newest readings with seconds when they are few or a
 * minute or more apart; otherwise one line per minute (newest minutes) with SpO₂ min–max and the count.
 */
export function readingLines(readings: MailReading[], timeZone: string): ReadingLine[] {
  if (readings.length === 0) return [];
  const newest = readings.slice(-SHOW_EACH_UP_TO);
  const spread = newest.length > 1 ? newest[newest.length - 1]!.at - newest[0]!.at : Infinity;
  const dense = readings.length > SHOW_EACH_UP_TO && spread < (newest.length - 1) * 60_000;
  if (!dense) {
    return newest.map((r) => ({
      time: formatClockSeconds(r.at, timeZone),
      spo2: r.spo2 === null ? '—' : `${r.spo2} %`,
      detail: `trace ${r.trace} · HR ${r.heartRate ?? '—'} · ${r.source}`,
    }));
  }
  const byMinute = new Map<number, MailReading[]>();
  for (const r of readings) {
    const m = Math.floor(r.at / 60_000);
    const list = byMinute.get(m) ?? [];
    list.push(r);
    byMinute.set(m, list);
  }
  const minutes = [...byMinute.keys()].sort((a, b) => a - b).slice(-MINUTES_SHOWN);
  return minutes.map((m) => {
    const rs = byMinute.get(m)!;
    const values = rs.map((r) => r.spo2).filter((v): v is number => v !== null);
    const lo = values.length ? Math.min(...values) : null;
    const hi = values.length ? Math.max(...values) : null;
    const poor = rs.filter((r) => r.trace === 'noisy' || r.trace === 'absent').length;
    return {
      time: formatClock(m * 60_000, timeZone),
      spo2: lo === null ? '—' : lo === hi ? `${lo} %` : `${lo}–${hi} %`,
      detail: `${rs.length} reading${rs.length === 1 ? '' : 's'} in the minute${poor ? `, ${poor} with a poor trace` : ''} · ${rs[rs.length - 1]!.source}`,
    };
  });
}

/** "No new readings since 06:08" when a reminder has nothing newer than the previous notice, or the monitor is silent. */
export function noNewReadingsLine(
  m: Pick<
    EscalationMailInput,
    'lastReadings' | 'now' | 'previousNoticeAt' | 'monitorSilentMin' | 'timeZone' | 'renotify'
  >,
): string | null {
  const newest = m.lastReadings.length ? m.lastReadings[m.lastReadings.length - 1]!.at : null;
  if (newest === null || m.now === undefined) return null;
  const nothingSinceLastNotice = m.renotify > 0 && m.previousNoticeAt != null && newest <= m.previousNoticeAt;
  const silent = m.now - newest > (m.monitorSilentMin ?? 3) * 60_000;
  return nothingSinceLastNotice || silent ? `No new readings since ${formatWhen(newest, m.timeZone, m.now)}` : null;
}

export function buildEscalationMail(m: EscalationMailInput): { subject: string; text: string; html: string } {
  const time = (t: number) => formatClock(t, m.timeZone);
  const severity = m.severity === 'urgent' ? 'URGENT ' : '';
  const again = m.renotify > 0 ? ` (reminder ${m.renotify}, not yet claimed)` : '';
  const subject = `[Ebbwatch] ${severity}${KIND_LABELS[m.kind]} — ${m.unitName} bed ${m.bedLabel}${again}`;
  const oxygen = `${m.oxygen.device ? DEVICE_LABELS[m.oxygen.device] : 'device not charted'}${m.oxygen.fio2 !== null ? `, FiO₂ ${m.oxygen.fio2.toFixed(2)}${m.oxygen.fio2Estimated ? ' (estimated)' : ''}` : ''}`;
  const news =
    m.news2 === null
      ? 'no obs charted'
      : 'total' in m.news2
        ? `${m.news2.total} (Scale ${m.news2.scale})`
        : `incomplete — missing ${m.news2.missing.map((p) => NEWS2_PARAMETER_WORDS[p]).join(', ')}`;
  const runLine = `Below band since ${time(m.run.start)} (last ${time(m.run.end)})${m.run.nadir !== null ? `, lowest trusted SpO₂ ${m.run.nadir} %` : ''}${m.run.rule ? ` — ${m.run.rule === 'charted_consecutive' ? 'consecutive charted obs below band' : 'device readings below band for the dwell time'}` : ''}`;
  const silence = noNewReadingsLine(m);
  const bedside = `Bedside nurse: ${m.bedsideNurse ?? 'none assigned'} · Unit phone: ${m.unitPhone ?? 'not set'}`;
  const rows = readingLines(m.lastReadings, m.timeZone);
  const claimUntil = m.claimLinkExpiresAt
    ? ` (works once, until ${formatWhen(m.claimLinkExpiresAt, m.timeZone, m.now ?? Date.now())}, after sign-in)`
    : ' (works once, after sign-in)';

  const facts = [
    `${m.hospital} · ${m.unitName} · bed ${m.bedLabel} · patient ${m.patientLabel}`,
    `Ordered band: ${m.band.low}–${m.band.high} %`,
    runLine,
    `Oxygen: ${oxygen}`,
    `NEWS2: ${news}`,
    bedside,
  ];
  const text = [
    ...facts,
    ...(silence ? [`${silence}.`] : []),
    'Last readings:',
    ...rows.map((r) => `  ${r.time}  SpO₂ ${r.spo2}  ${r.detail}`),
    '',
    ...(m.claimLink ? [`Claim it: ${m.claimLink}${claimUntil}`] : []),
    `Bed chart: ${m.link}`,
    '',
    MAIL_CAUTION,
  ].join('\n');

  const p = (s: string, style = '') => `<p style="margin:0 0 8px 0;${style}">${esc(s)}</p>`;
  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${esc(subject)}</title></head>
<body style="margin:0;padding:0;background:#f4f7f8;color:#13233a;font-family:Arial,Helvetica,sans-serif;font-size:16px;line-height:1.45">
<div style="max-width:560px;margin:0 auto;padding:16px;background:#ffffff">
<h1 style="font-size:20px;margin:0 0 12px 0">${esc(subject.replace('[Ebbwatch] ', ''))}</h1>
${facts.map((f) => p(f)).join('\n')}
${silence ? p(`${silence}.`, 'font-weight:bold;color:#8a2d12') : ''}
<h2 style="font-size:16px;margin:16px 0 6px 0">Last readings</h2>
${rows.map((r) => `<p style="margin:0 0 6px 0"><strong>${esc(r.time)}</strong> · SpO₂ <strong>${esc(r.spo2)}</strong><br><span style="color:#44556b">${esc(r.detail)}</span></p>`).join('\n')}
${m.claimLink ? `<p style="margin:16px 0 8px 0"><a href="${esc(m.claimLink)}" style="display:block;padding:12px 16px;background:#13233a;color:#ffffff;text-align:center;text-decoration:none;border-radius:6px;font-weight:bold">Claim this escalation</a></p>${p(claimUntil.trim().replace(/^\(|\)$/g, ''), 'font-size:14px;color:#44556b;text-align:center')}` : ''}
<p style="margin:8px 0 16px 0"><a href="${esc(m.link)}" style="color:#13233a">Open the bed chart</a></p>
${p(MAIL_CAUTION, 'font-size:14px;color:#44556b')}
</div>
</body></html>`;
  return { subject, text, html };
}
