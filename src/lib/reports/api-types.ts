/** JSON shapes of the report and handover APIs, shared by server and islands. */
import type { OxygenDevice } from '~/lib/oxygenation/types.ts';
import type { Spread } from './stats.ts';

export const REPORT_DAYS = [7, 30, 90] as const;
export type ReportDays = (typeof REPORT_DAYS)[number];

export interface ReportFiguresView {
  patientDays: number;
  timeInBandPct: number | null;
  inBandMin: number;
  belowMin: number;
  aboveMin: number;
  untrustedMin: number;
  noReadingMin: number;
  burdenPctMin: number;
  belowMinPerPatientDay: number | null;
  escalations: { belowStandard: number; belowUrgent: number; probeCheck: number; weanPrompt: number };
  toClaimMin: Spread;
  toCloseMin: Spread;
  overdueCount: number;
  trustedReadings: number;
  untrustedReadings: number;
  untrustedSharePct: number | null;
}

export interface ReportDayView extends ReportFiguresView {
  date: string;
  from: string;
  to: string;
}

export interface UnitReportResponse {
  unit: { code: string; name: string; timeZone: string };
  units: { code: string; name: string }[];
  days: ReportDays;
  period: { from: string; to: string };
  generatedAt: string;
  settings: { overdueMin: number };
  perDay: ReportDayView[];
  total: ReportFiguresView;
  hospitalView: boolean;
}

export interface HospitalReportResponse {
  days: ReportDays;
  generatedAt: string;
  units: {
    unit: { code: string; name: string; timeZone: string };
    period: { from: string; to: string };
    total: ReportFiguresView;
  }[];
}

export interface HandoverNoteView {
  id: number;
  version: number;
  note: string;
  writtenBy: string;
  writtenAt: string;
}

export interface HandoverEscalationView {
  id: number;
  kind: 'below_band' | 'probe_check' | 'wean_prompt';
  severity: 'standard' | 'urgent' | null;
  state: string;
  raisedAt: string;
  outcome: string | null;
  minutesToClaim: number | null;
  minutesToClose: number | null;
}

export interface OxygenStateView {
  device: OxygenDevice | null;
  fio2: number | null;
  fio2Estimated: boolean;
  at: string;
}
export interface News2View {
  total: number | null;
  complete: boolean;
  missing: string[];
  response: string | null;
  at: string;
}

export interface HandoverBed {
  bedId: number;
  bedLabel: string;
  patient: null | {
    id: number;
    label: string;
    nurse: string | null;
    band: { low: number; high: number; news2Scale: 1 | 2 } | null;
    bandChanges: { low: number; high: number; news2Scale: 1 | 2; at: string; by: string; reason: string }[];
    compliance: {
      inBandMin: number;
      belowMin: number;
      untrustedMin: number;
      timeInBandPct: number | null;
      windowMin: number;
    };
    lowest: { spo2: number; at: string } | null;
    escalations: HandoverEscalationView[];
    openPrompts: { kind: 'probe_check' | 'wean_prompt'; raisedAt: string }[];
    oxygen: { atStart: OxygenStateView | null; now: OxygenStateView | null; changes: OxygenStateView[] };
    news2Now: News2View | null;
    news2AtStart: News2View | null;
    lastChartedAt: string | null;
    overdueMin: number | null;
    note: HandoverNoteView | null;
  };
}

export interface HandoverResponse {
  unit: { code: string; name: string; timeZone: string };
  units: { code: string; name: string }[];
  scope: 'mine' | 'unit';
  shift: { from: string; to: string; kind: 'day' | 'night'; start: string; end: string };
  generatedAt: string;
  settings: { overdueMin: number };
  beds: HandoverBed[];
}
