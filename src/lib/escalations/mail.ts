/**
 * The escalation e-mail: minimum necessary patient data (initials and last 3 of the MRN only),
 * the band, the run, the last readings, oxygen, NEWS2 when complete, a link, and the caution.
 */
import { DEVICE_LABELS } from '~/lib/charting/obs-input.ts';
import type { OxygenDevice, TraceQuality } from '~/lib/oxygenation/types.ts';
import { KIND_LABELS, type EscalationKind } from './decide.ts';
import { formatClock } from '~/lib/time/format.ts';

export interface EscalationMailInput {
  hospital: string; unitName: string; bedLabel: string; patientLabel: string; timeZone: string;
  kind: EscalationKind; severity: 'standard' | 'urgent' | null; renotify: number;
  band: { low: number; high: number };
  run: { start: number; end: number; nadir: number | null; rule: string | null };
  lastReadings: { at: number; spo2: number | null; trace: TraceQuality; heartRate: number | null; source: string }[];
  oxygen: { fio2: number | null; fio2Estimated: boolean; device: OxygenDevice | null };
  news2: { total: number; scale: 1 | 2 } | null;
  link: string;
}

export const MAIL_CAUTION =
  'Decision support only: follow local protocols and the treating team. Pulse oximetry can over-read in people with darker skin and in poor perfusion; confirm doubtful readings with an arterial blood gas.';

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

export function buildEscalationMail(m: EscalationMailInput): { subject: string; text: string; html: string } {
  const time = (t: number) => formatClock(t, m.timeZone);
  const severity = m.severity === 'urgent' ? 'URGENT ' : '';
  const again = m.renotify > 0 ? ` (reminder ${m.renotify}, not yet claimed)` : '';
  const subject = `[Ebbwatch] ${severity}${KIND_LABELS[m.kind]} — ${m.unitName} bed ${m.bedLabel}${again}`;
  const oxygen = `${m.oxygen.device ? DEVICE_LABELS[m.oxygen.device] : 'device not charted'}${m.oxygen.fio2 !== null ? `, FiO₂ ${m.oxygen.fio2.toFixed(2)}${m.oxygen.fio2Estimated ? ' (estimated)' : ''}` : ''}`;
  const lines = [
    `${m.hospital} · ${m.unitName} · bed ${m.bedLabel} · patient ${m.patientLabel}`,
    `Ordered band: ${m.band.low}–${m.band.high} %`,
    `Below band since ${time(m.run.start)} (last ${time(m.run.end)})${m.run.nadir !== null ? `, lowest trusted SpO₂ ${m.run.nadir} %` : ''}${m.run.rule ? ` — ${m.run.rule === 'charted_consecutive' ? 'consecutive charted obs below band' : 'device readings below band for the dwell time'}` : ''}`,
    `Oxygen: ${oxygen}`,
    `NEWS2: ${m.news2 ? `${m.news2.total} (Scale ${m.news2.scale})` : 'incomplete'}`,
    'Last readings:',
    ...m.lastReadings.map((r) => `  ${time(r.at)}  SpO₂ ${r.spo2 ?? '—'} %  trace ${r.trace}  HR ${r.heartRate ?? '—'}  (${r.source})`),
    '',
    `Bed chart: ${m.link}`,
    '',
    MAIL_CAUTION,
  ];
  const html = `<!doctype html><html><body style="font-family:sans-serif">
<p><strong>${esc(subject.replace('[Ebbwatch] ', ''))}</strong></p>
<p>${esc(lines[0]!)}<br>${esc(lines[1]!)}<br>${esc(lines[2]!)}<br>${esc(lines[3]!)}<br>${esc(lines[4]!)}</p>
<table border="1" cellpadding="4" cellspacing="0"><tr><th>Time</th><th>SpO₂ %</th><th>Trace</th><th>HR</th><th>Source</th></tr>
${m.lastReadings.map((r) => `<tr><td>${time(r.at)}</td><td>${r.spo2 ?? '—'}</td><td>${esc(r.trace)}</td><td>${r.heartRate ?? '—'}</td><td>${esc(r.source)}</td></tr>`).join('\n')}
</table>
<p><a href="${esc(m.link)}">Open the bed chart</a></p>
<p style="color:#555">${esc(MAIL_CAUTION)}</p>
</body></html>`;
  return { subject, text: lines.join('\n'), html };
}
