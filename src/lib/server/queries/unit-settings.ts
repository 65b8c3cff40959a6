import type { Knex } from 'knex';
import { db } from './db.ts';

export interface UnitSettingsRow {
  unit_id: number;
  consecutive_charted: number;
  device_dwell_min: number;
  urgent_margin_points: number;
  urgent_floor_pct: number;
  cannot_verify_min: number;
  above_on_oxygen_min: number;
  renotify_min: number;
  overdue_min: number;
  outreach_emails: string;
  shift_start: string;
  shift_end: string;
  gas_unit?: 'kPa' | 'mmHg';
  barometric_mmhg?: number;
  unit_phone: string | null;
  monitor_silent_min: number;
  silent_below_probe_min: number;
  updated_by: number | null;
  updated_at: Date;
}

export async function unitSettingsRow(
  unitId: number,
  conn: Knex | Knex.Transaction = db(),
): Promise<UnitSettingsRow | undefined> {
  return conn<UnitSettingsRow>('unit_settings').where({ unit_id: unitId }).first();
}

export async function unitSettingsRows(
  unitIds: number[],
  conn: Knex | Knex.Transaction = db(),
): Promise<UnitSettingsRow[]> {
  if (unitIds.length === 0) return [];
  return conn<UnitSettingsRow>('unit_settings').whereIn('unit_id', unitIds);
}

export async function upsertUnitSettings(
  trx: Knex.Transaction,
  row: Omit<UnitSettingsRow, 'updated_at'> & { updated_at: Date },
): Promise<void> {
  await trx('unit_settings').insert(row).onConflict('unit_id').merge();
}
