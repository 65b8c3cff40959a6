/** The unit report as CSV: one row per local day and a total row; times in the unit's zone. */
import { formatDate, formatDateTime } from '~/lib/time/format.ts';
import type { ReportFiguresView, UnitReportResponse } from './api-types.ts';

const HEADER = [
  'day',
  'from',
  'to',
  'patient_days',
  'time_in_band_pct',
  'below_band_min_per_patient_day',
  'below_band_min',
  'in_band_min',
  'above_band_min',
  'untrusted_min',
  'hypoxaemic_burden_pct_min',
  'below_band_standard',
  'below_band_urgent',
  'probe_checks',
  'wean_prompts',
  'raised_to_claimed_median_min',
  'raised_to_claimed_p90_min',
  'claimed_to_closed_median_min',
  'claimed_to_closed_p90_min',
  'obs_overdue_count',
  'untrusted_readings_pct',
];

function cell(v: string | number | null): string {
  if (v === null) return '';
  const s = String(v);
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function figures(f: ReportFiguresView): (string | number | null)[] {
  return [
    f.patientDays,
    f.timeInBandPct,
    f.belowMinPerPatientDay,
    f.belowMin,
    f.inBandMin,
    f.aboveMin,
    f.untrustedMin,
    f.burdenPctMin,
    f.escalations.belowStandard,
    f.escalations.belowUrgent,
    f.escalations.probeCheck,
    f.escalations.weanPrompt,
    f.toClaimMin.median,
    f.toClaimMin.p90,
    f.toCloseMin.median,
    f.toCloseMin.p90,
    f.overdueCount,
    f.untrustedSharePct,
  ];
}

export function reportCsv(r: UnitReportResponse): string {
  const tz = r.unit.timeZone;
  const lines = [HEADER.join(',')];
  for (const d of r.perDay)
    lines.push(
      [formatDate(d.from, tz), formatDateTime(d.from, tz), formatDateTime(d.to, tz), ...figures(d)].map(cell).join(','),
    );
  lines.push(
    [`total ${r.days} days`, formatDateTime(r.period.from, tz), formatDateTime(r.period.to, tz), ...figures(r.total)]
      .map(cell)
      .join(','),
  );
  return `${lines.join('\r\n')}\r\n`;
}

export function reportCsvFileName(r: UnitReportResponse): string {
  return `ebbwatch-report-${r.unit.code}-${r.days}d-${r.perDay[r.perDay.length - 1]?.date ?? 'empty'}.csv`;
}
