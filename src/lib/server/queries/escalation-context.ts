import type { Knex } from 'knex';
import type { UnitSettingsRow } from './unit-settings.ts';
import type { UnitSettingsColumns } from '~/lib/units/settings.ts';
import type { ChartedObsRow } from './observations.ts';

export interface PatientContext {
  patientId: number;
  givenName: string;
  familyName: string;
  mrn: string;
  bedId: number;
  bedLabel: string;
  unitId: number;
  unitName: string;
  hospital: string;
  timeZone: string;
  band: { low: number; high: number; news2Scale: number; orderedAt: Date } | null;
  settings: UnitSettingsRow | null;
  lastCharted: ChartedObsRow | null;
}

/** Everything the escalation engine needs about a patient in a bed, or undefined when not admitted. */
export async function patientContext(trx: Knex.Transaction, patientId: number): Promise<PatientContext | undefined> {
  const row = await trx('bed_stays as s')
    .join('patients as p', 'p.id', 's.patient_id')
    .join('beds as b', 'b.id', 's.bed_id')
    .join('units as u', 'u.id', 'b.unit_id')
    .leftJoin('unit_settings as us', 'us.unit_id', 'u.id')
    .where('s.patient_id', patientId)
    .whereNull('s.ended_at')
    .first(
      'p.id as patient_id',
      'p.given_name',
      'p.family_name',
      'p.mrn',
      'b.id as bed_id',
      'b.label as bed_label',
      'u.id as unit_id',
      'u.name as unit_name',
      'u.hospital',
      'u.time_zone',
      'us.unit_id as settings_unit_id',
    );
  if (!row) return undefined;
  const [order, settings, lastCharted] = await Promise.all([
    trx('target_orders')
      .where({ patient_id: patientId })
      .orderBy('id', 'desc')
      .first('low', 'high', 'news2_scale', 'ordered_at'),
    row.settings_unit_id
      ? trx<UnitSettingsRow>('unit_settings').where({ unit_id: row.unit_id }).first()
      : Promise.resolve(undefined),
    trx('observations')
      .where({ patient_id: patientId, source: 'charted', status: 'current' })
      .orderBy('taken_at', 'desc')
      .orderBy('id', 'desc')
      .first(
        'taken_at',
        'source',
        'spo2',
        'heart_rate',
        'resp_rate',
        'fio2',
        'fio2_estimated',
        'device',
        'flow_lpm',
        'trace',
        'perfusion_index',
        'systolic',
        'temperature',
        'consciousness',
      ),
  ]);
  return {
    patientId,
    givenName: row.given_name,
    familyName: row.family_name,
    mrn: row.mrn,
    bedId: row.bed_id,
    bedLabel: row.bed_label,
    unitId: row.unit_id,
    unitName: row.unit_name,
    hospital: row.hospital,
    timeZone: row.time_zone,
    band: order
      ? {
          low: order.low,
          high: order.high,
          news2Scale: Number(order.news2_scale),
          orderedAt: new Date(order.ordered_at),
        }
      : null,
    settings: settings ?? null,
    lastCharted: lastCharted ?? null,
  };
}

export interface SweepContext {
  patientId: number;
  unitId: number;
  band: { low: number; high: number; orderedAt: Date } | null;
  /** Null when no admin has configured the unit (the defaults apply). */
  settings: UnitSettingsColumns | null;
}

/** Band and unit settings of many admitted patients in one query (the sweep's read-only first pass). */
export async function sweepContexts(conn: Knex, patientIds: number[]): Promise<SweepContext[]> {
  if (patientIds.length === 0) return [];
  const latest = conn('target_orders')
    .whereIn('patient_id', patientIds)
    .groupBy('patient_id')
    .select('patient_id')
    .max('id as id')
    .as('lo');
  const rows = await conn('bed_stays as s')
    .join('beds as b', 'b.id', 's.bed_id')
    .leftJoin('unit_settings as us', 'us.unit_id', 'b.unit_id')
    .leftJoin(latest, 'lo.patient_id', 's.patient_id')
    .leftJoin('target_orders as o', 'o.id', 'lo.id')
    .whereIn('s.patient_id', patientIds)
    .whereNull('s.ended_at')
    .select(
      's.patient_id',
      'b.unit_id',
      'o.low as band_low',
      'o.high as band_high',
      'o.ordered_at',
      'us.unit_id as settings_unit_id',
      'us.consecutive_charted',
      'us.device_dwell_min',
      'us.urgent_margin_points',
      'us.urgent_floor_pct',
      'us.cannot_verify_min',
      'us.above_on_oxygen_min',
      'us.renotify_min',
      'us.overdue_min',
      'us.outreach_emails',
    );
  return rows.map((r) => ({
    patientId: r.patient_id,
    unitId: r.unit_id,
    band: r.band_low === null ? null : { low: r.band_low, high: r.band_high, orderedAt: new Date(r.ordered_at) },
    settings:
      r.settings_unit_id === null
        ? null
        : {
            consecutive_charted: r.consecutive_charted,
            device_dwell_min: r.device_dwell_min,
            urgent_margin_points: r.urgent_margin_points,
            urgent_floor_pct: r.urgent_floor_pct,
            cannot_verify_min: r.cannot_verify_min,
            above_on_oxygen_min: r.above_on_oxygen_min,
            renotify_min: r.renotify_min,
            overdue_min: r.overdue_min,
            outreach_emails: r.outreach_emails,
          },
  }));
}
