/** A unit's settings as the app uses them; the defaults apply to a unit no admin has configured yet. */
import { DEFAULT_ESCALATION_SETTINGS, type EscalationSettings } from '~/lib/oxygenation/settings.ts';
import { SEA_LEVEL_MMHG, type GasUnit } from '~/lib/bloodgas/compute.ts';

export interface UnitSettings extends EscalationSettings {
  /** Minutes after the last charted obs when the board marks obs overdue. */
  overdueMin: number;
  /** Minutes after which an unclaimed below-band escalation is mailed again. */
  renotifyMin: number;
  outreachEmails: string[];
  /** Handover shift times, wall clock in the unit's zone (the day shift runs start → end). */
  shiftStart: string;
  shiftEnd: string;
  /** Blood gases are shown in this unit (stored in mmHg). */
  gasUnit: GasUnit;
  /** Barometric pressure for the alveolar gas equation, mmHg. */
  barometricMmHg: number;
  /** The unit's phone, given in escalation e-mail (null: not set). */
  unitPhone: string | null;
  /** A monitored bed whose newest device reading is older than this is "monitor silent". */
  monitorSilentMin: number;
  /** Silence this long right after trusted below-band readings raises a bedside probe check. */
  silentBelowProbeMin: number;
}

export const DEFAULT_UNIT_SETTINGS: UnitSettings = {
  ...DEFAULT_ESCALATION_SETTINGS,
  overdueMin: 75,
  renotifyMin: 15,
  outreachEmails: [],
  shiftStart: '07:30',
  shiftEnd: '19:30',
  gasUnit: 'kPa',
  barometricMmHg: SEA_LEVEL_MMHG,
  unitPhone: null,
  monitorSilentMin: 3,
  silentBelowProbeMin: 3,
};

export interface UnitSettingsColumns {
  consecutive_charted: number;
  device_dwell_min: number;
  urgent_margin_points: number;
  urgent_floor_pct: number;
  cannot_verify_min: number;
  above_on_oxygen_min: number;
  renotify_min: number;
  overdue_min: number;
  outreach_emails: string;
  shift_start?: string;
  shift_end?: string;
  gas_unit?: GasUnit;
  barometric_mmhg?: number;
  unit_phone?: string | null;
  monitor_silent_min?: number | null;
  silent_below_probe_min?: number | null;
}

export function settingsFromRow(row: UnitSettingsColumns | undefined): UnitSettings {
  if (!row) return DEFAULT_UNIT_SETTINGS;
  return {
    ...DEFAULT_UNIT_SETTINGS,
    consecutiveCharted: row.consecutive_charted,
    deviceDwellMin: row.device_dwell_min,
    urgentMarginPoints: row.urgent_margin_points,
    urgentFloorPct: row.urgent_floor_pct,
    cannotVerifyMin: row.cannot_verify_min,
    aboveOnOxygenMin: row.above_on_oxygen_min,
    renotifyMin: row.renotify_min,
    overdueMin: row.overdue_min,
    shiftStart: row.shift_start ?? DEFAULT_UNIT_SETTINGS.shiftStart,
    shiftEnd: row.shift_end ?? DEFAULT_UNIT_SETTINGS.shiftEnd,
    outreachEmails: row.outreach_emails.split(/[\s,;]+/).filter(Boolean),
    gasUnit: row.gas_unit ?? DEFAULT_UNIT_SETTINGS.gasUnit,
    barometricMmHg: row.barometric_mmhg ?? DEFAULT_UNIT_SETTINGS.barometricMmHg,
    unitPhone: row.unit_phone ?? null,
    monitorSilentMin: row.monitor_silent_min ?? DEFAULT_UNIT_SETTINGS.monitorSilentMin,
    silentBelowProbeMin: row.silent_below_probe_min ?? DEFAULT_UNIT_SETTINGS.silentBelowProbeMin,
  };
}
