import { describe, expect, it } from 'vitest';
import type { ReportFiguresView, UnitReportResponse } from './api-types.ts';
import { reportCsv, reportCsvFileName } from './csv.ts';

const f: ReportFiguresView = {
  patientDays: 1,
  timeInBandPct: 69.2,
  inBandMin: 135,
  belowMin: 60,
  aboveMin: 0,
  untrustedMin: 60,
  noReadingMin: 1185,
  burdenPctMin: 120,
  belowMinPerPatientDay: 60,
  escalations: { belowStandard: 1, belowUrgent: 1, probeCheck: 1, weanPrompt: 0 },
  toClaimMin: { n: 2, median: 20, p90: 28 },
  toCloseMin: { n: 0, median: null, p90: null },
  overdueCount: 1,
  trustedReadings: 3,
  untrustedReadings: 1,
  untrustedSharePct: 25,
};
const report = {
  unit: { code: 'L4ICU', name: 'Level 4, "ICU"', timeZone: 'Europe/London' },
  units: [],
  days: 7,
  period: { from: '2026-06-30T23:00:00.000Z', to: '2026-07-01T23:00:00.000Z' },
  generatedAt: '2026-07-02T08:00:00.000Z',
  settings: { overdueMin: 75 },
  perDay: [{ date: '2026-07-01', from: '2026-06-30T23:00:00.000Z', to: '2026-07-01T23:00:00.000Z', ...f }],
  total: f,
  hospitalView: false,
} as UnitReportResponse;

describe('reportCsv', () => {
  const lines = reportCsv(report).split('\r\n');
  it('writes days and times in the unit zone (summer time here), day first with the month as a word', () => {
    expect(
      lines[1]!.startsWith(
        '1 Jul 2026,1 Jul 2026 00:00,2 Jul 2026 00:00,1,69.2,60,60,135,0,60,120,1,1,1,0,20,28,,,1,25',
      ),
    ).toBe(true);
  });
  it('leaves missing figures empty, ends with a total row and CRLF line ends', () => {
    expect(lines[2]!.startsWith('total 7 days,')).toBe(true);
    expect(lines[3]).toBe('');
    expect(lines[0]!.split(',')).toHaveLength(lines[1]!.split(',').length);
  });
  it('names the file after unit, period and last day', () => {
    expect(reportCsvFileName(report)).toBe('ebbwatch-report-L4ICU-7d-2026-07-01.csv');
  });
});
