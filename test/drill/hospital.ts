/**
 * The drill's invented hospital group: UNITS units of BEDS beds, every bed occupied by an invented
 * patient with a 92–96 % band and a device key, one charge nurse and one nurse per unit, and one
 * intensivist who sees every unit (the board pollers). Written straight into an empty database in
 * one transaction, as the demo seed is; nothing here is used by the app.
 */
import bcrypt from 'bcryptjs';
import type { Knex } from 'knex';
import { newDeviceKey } from '~/lib/server/devices/keys.ts';

export const DRILL_PASSWORD = 'drill-password-not-for-use';

export interface DrillBed {
  bedId: number;
  patientId: number;
  unitCode: string;
  key: string;
  desaturates: boolean;
}
export interface DrillHospital {
  units: string[];
  beds: DrillBed[];
  nurses: { email: string; unitCode: string }[];
  intensivist: string;
}

export async function createDrillHospital(
  knex: Knex,
  units: number,
  bedsPerUnit: number,
  settings: { deviceDwellMin: number; renotifyMin: number },
): Promise<DrillHospital> {
  const hash = await bcrypt.hash(DRILL_PASSWORD, 4);
  const admittedAt = new Date(Date.now() - 2 * 3_600_000);
  return knex.transaction(async (trx) => {
    const [intensivistId] = await trx('users').insert({
      email: 'drill-intensivist@drill.example',
      name: 'Drill Intensivist',
      role: 'intensivist',
      password_hash: hash,
    });
    const out: DrillHospital = { units: [], beds: [], nurses: [], intensivist: 'drill-intensivist@drill.example' };
    for (let u = 1; u <= units; u++) {
      const code = `DR${String(u).padStart(2, '0')}`;
      const [unitId] = await trx('units').insert({
        code,
        name: `Drill unit ${u}`,
        hospital: 'Drill Hospital Group',
        time_zone: 'Europe/London',
      });
      await trx('unit_settings').insert({
        unit_id: unitId,
        outreach_emails: `outreach-${code.toLowerCase()}@drill.example`,
        device_dwell_min: settings.deviceDwellMin,
        renotify_min: settings.renotifyMin,
      });
      const [chargeId] = await trx('users').insert({
        email: `charge-${code.toLowerCase()}@drill.example`,
        name: `Charge ${code}`,
        role: 'charge',
        unit_id: unitId,
        password_hash: hash,
      });
      await trx('users').insert({
        email: `nurse-${code.toLowerCase()}@drill.example`,
        name: `Nurse ${code}`,
        role: 'nurse',
        unit_id: unitId,
        password_hash: hash,
      });
      out.units.push(code);
      out.nurses.push({ email: `charge-${code.toLowerCase()}@drill.example`, unitCode: code });
      for (let b = 1; b <= bedsPerUnit; b++) {
        const label = `${code}-${String(b).padStart(2, '0')}`;
        const [bedId] = await trx('beds').insert({ unit_id: unitId, label, position: b });
        const [patientId] = await trx('patients').insert({
          mrn: `DRL${String(u).padStart(2, '0')}${String(b).padStart(3, '0')}`,
          given_name: 'Drill',
          family_name: `Patient ${label}`,
          date_of_birth: '1960-01-01',
          created_by: chargeId,
          created_at: admittedAt,
        });
        await trx('bed_stays').insert({
          patient_id: patientId,
          bed_id: bedId,
          started_at: admittedAt,
          started_by: chargeId,
        });
        await trx('target_orders').insert({
          patient_id: patientId,
          low: 92,
          high: 96,
          news2_scale: 1,
          preset: null,
          reason: 'Drill band',
          ordered_by: intensivistId,
          ordered_at: admittedAt,
        });
        const { key, hash: keyHash, prefix } = newDeviceKey();
        await trx('device_keys').insert({
          bed_id: bedId,
          label: 'drill gateway',
          key_hash: keyHash,
          key_prefix: prefix,
          created_by: null,
          created_at: admittedAt,
        });
        // The first bed of every unit desaturates during the drill: one escalation each is expected.
        out.beds.push({ bedId, patientId, unitCode: code, key, desaturates: b === 1 });
      }
    }
    return out;
  });
}
