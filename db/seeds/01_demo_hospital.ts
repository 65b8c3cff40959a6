import type { Knex } from 'knex';
import { rebuildAllRollups } from '../../src/lib/server/queries/rollup.ts';
import bcrypt from 'bcryptjs';
import {
  DEMO_HOSPITAL,
  DEMO_PASSWORD,
  demoBloodGases,
  demoPatients,
  demoUnits,
  demoUsers,
  generateDemoObservations,
} from '../../src/lib/demo/scenario.ts';
import { generateDemoHistory } from '../../src/lib/demo/history.ts';
import { gasFlags, kpaToMmHg } from '../../src/lib/bloodgas/compute.ts';

// The invented demo scenario (PRODUCT.md "Demo scenario"). Refuses to run over existing data:
// clinical rows are never deleted, so a reseed means a fresh database.
export async function seed(knex: Knex): Promise<void> {
  const existing = await knex('units').count<{ n: number }[]>({ n: '*' });
  if (Number(existing[0].n) > 0) {
    console.log('seed: units exist already, demo seed skipped');
    return;
  }
  const now = new Date();
  const hash = await bcrypt.hash(DEMO_PASSWORD, 10);

  await knex.transaction(async (trx) => {
    const unitIds = new Map<string, number>();
    const bedIds = new Map<string, number>();
    for (const unit of demoUnits) {
      const [unitId] = await trx('units').insert({
        code: unit.code,
        name: unit.name,
        hospital: DEMO_HOSPITAL,
        time_zone: unit.timeZone,
      });
      unitIds.set(unit.code, unitId);
      for (const [position, label] of unit.beds.entries()) {
        const [bedId] = await trx('beds').insert({ unit_id: unitId, label, position });
        bedIds.set(label, bedId);
      }
    }
    for (const unit of demoUnits) {
      await trx('unit_settings').insert({
        unit_id: unitIds.get(unit.code),
        outreach_emails: 'outreach@harbourside.example, outreach-team@harbourside.example',
      });
    }
    const userIds = new Map<string, number>();
    for (const user of demoUsers) {
      const [id] = await trx('users').insert({
        email: user.email,
        name: user.name,
        role: user.role,
        unit_id: user.unitCode ? unitIds.get(user.unitCode) : null,
        password_hash: hash,
      });
      userIds.set(user.email, id);
    }
    const chargeId = userIds.get('charge@harbourside.example')!;
    const intensivistId = userIds.get('intensivist@harbourside.example')!;
    const nurseId = userIds.get('nurse@harbourside.example')!;

    const patientIds = new Map<string, number>();
    const bedOf = new Map<string, number>();
    for (const pt of demoPatients) {
      const admittedAt = new Date(now.getTime() - pt.admittedHoursAgo * 3_600_000);
      const [id] = await trx('patients').insert({
        mrn: pt.mrn,
        given_name: pt.givenName,
        family_name: pt.familyName,
        date_of_birth: pt.dateOfBirth,
        co2_retention_risk: pt.co2RetentionRisk,
        created_by: chargeId,
        created_at: admittedAt,
      });
      patientIds.set(pt.mrn, id);
      bedOf.set(pt.mrn, bedIds.get(pt.bedLabel)!);
      await trx('bed_stays').insert({
        patient_id: id,
        bed_id: bedIds.get(pt.bedLabel),
        started_at: admittedAt,
        started_by: chargeId,
      });
      if (pt.band) {
        await trx('target_orders').insert({
          patient_id: id,
          low: pt.band.low,
          high: pt.band.high,
          news2_scale: pt.band.news2Scale,
          preset: pt.band.preset,
          reason: pt.band.reason,
          ordered_by: intensivistId,
          ordered_at: new Date(admittedAt.getTime() + 10 * 60_000),
        });
      }
    }

    // The demo bedside nurse looks after the first three beds of Level 4.
    for (const label of ['4-01', '4-02', '4-03']) {
      await trx('bed_assignments').insert({
        bed_id: bedIds.get(label),
        nurse_id: nurseId,
        assigned_by: chargeId,
        assigned_at: now,
      });
    }

    const rows = generateDemoObservations(now).map((o) => ({
      patient_id: patientIds.get(o.mrn),
      bed_id: bedOf.get(o.mrn),
      taken_at: o.takenAt,
      source: o.source,
      spo2: o.spo2,
      heart_rate: o.heartRate,
      resp_rate: o.respRate,
      fio2: o.fio2,
      fio2_estimated: o.fio2Estimated,
      device: o.device,
      flow_lpm: o.flowLpm,
      trace: o.trace,
      perfusion_index: o.perfusionIndex,
      systolic: o.systolic,
      temperature: o.temperature,
      consciousness: o.consciousness,
      probe_site: o.probeSite,
      recorded_by: o.source === 'charted' ? nurseId : null,
      recorded_at: o.takenAt,
    }));
    for (let i = 0; i < rows.length; i += 2000) await trx('observations').insert(rows.slice(i, i + 2000));

    // 14 days of earlier (discharged) patients, so the unit report has a history on first start.
    const history = generateDemoHistory(now);
    const unitOfBed = new Map(demoUnits.flatMap((u) => u.beds.map((b) => [b, unitIds.get(u.code)!] as const)));
    for (const pt of history.patients) {
      const [id] = await trx('patients').insert({
        mrn: pt.mrn,
        given_name: pt.givenName,
        family_name: pt.familyName,
        date_of_birth: pt.dateOfBirth,
        co2_retention_risk: pt.co2RetentionRisk,
        created_by: chargeId,
        created_at: pt.admittedAt,
      });
      patientIds.set(pt.mrn, id);
      bedOf.set(pt.mrn, bedIds.get(pt.bedLabel)!);
      await trx('bed_stays').insert({
        patient_id: id,
        bed_id: bedIds.get(pt.bedLabel),
        started_at: pt.admittedAt,
        started_by: chargeId,
        ended_at: pt.dischargedAt,
        end_reason: 'discharged',
        ended_by: chargeId,
      });
      await trx('target_orders').insert({
        patient_id: id,
        low: pt.band.low,
        high: pt.band.high,
        news2_scale: pt.band.news2Scale,
        preset: pt.band.preset,
        reason: pt.band.reason,
        ordered_by: intensivistId,
        ordered_at: new Date(pt.admittedAt.getTime() + 10 * 60_000),
      });
    }
    const pastRows = history.observations.map((o) => ({
      patient_id: patientIds.get(o.mrn),
      bed_id: bedOf.get(o.mrn),
      taken_at: o.takenAt,
      source: o.source,
      spo2: o.spo2,
      heart_rate: o.heartRate,
      resp_rate: o.respRate,
      fio2: o.fio2,
      fio2_estimated: o.fio2Estimated,
      device: o.device,
      flow_lpm: o.flowLpm,
      trace: o.trace,
      perfusion_index: o.perfusionIndex,
      systolic: o.systolic,
      temperature: o.temperature,
      consciousness: o.consciousness,
      probe_site: o.probeSite,
      recorded_by: nurseId,
      recorded_at: o.takenAt,
    }));
    for (let i = 0; i < pastRows.length; i += 2000) await trx('observations').insert(pastRows.slice(i, i + 2000));
    const outreachId = userIds.get('outreach@harbourside.example')!;
    for (const e of history.escalations) {
      const pid = patientIds.get(e.mrn)!;
      const bedLabel = history.patients.find((p) => p.mrn === e.mrn)!.bedLabel;
      const claimer = e.outcome === 'reviewed_by_outreach' ? outreachId : chargeId;
      const [id] = await trx('escalations').insert({
        patient_id: pid,
        unit_id: unitOfBed.get(bedLabel),
        bed_id: bedIds.get(bedLabel),
        kind: e.kind,
        severity: e.severity,
        state: 'closed',
        raised_at: e.raisedAt,
        run_start: e.runStart,
        run_end: e.runEnd,
        evidence: JSON.stringify({ lowest: e.lowest, demo: true }),
        claimed_by: claimer,
        claimed_at: e.claimedAt,
        closed_by: claimer,
        closed_at: e.closedAt,
        outcome: e.outcome,
        notify_count: e.kind === 'below_band' ? 1 : 0,
        last_notified_at: e.kind === 'below_band' ? e.raisedAt : null,
      });
      await trx('escalation_events').insert([
        { escalation_id: id, type: 'raised', actor_id: null, at: e.raisedAt },
        { escalation_id: id, type: 'claimed', actor_id: claimer, at: e.claimedAt },
        {
          escalation_id: id,
          type: 'closed',
          actor_id: claimer,
          at: e.closedAt,
          detail: JSON.stringify({ outcome: e.outcome }),
        },
      ]);
    }

    // Handover notes left by the last shift for two of today's patients (version 1; the sheet shows them).
    const chargeNotes: [string, string][] = [
      ['HG400117', 'Settled overnight on high-flow; watch the SpO₂ trend after proning review at 10:00.'],
      ['HG400233', 'CO₂ retainer: keep to the 88–92 % band; family visiting this afternoon.'],
    ];
    for (const [mrn, note] of chargeNotes) {
      const pid = patientIds.get(mrn)!;
      await trx('handover_notes').insert({
        patient_id: pid,
        unit_id: unitIds.get('L4ICU'),
        version: 1,
        note,
        supersedes_id: null,
        written_by: nurseId,
        written_at: new Date(now.getTime() - 9 * 3_600_000),
      });
    }

    // Invented blood gases; an occult-hypoxaemia pair raises its bedside task as charting would.
    for (const g of demoBloodGases) {
      const sampledAt = new Date(now.getTime() - g.hoursAgo * 3_600_000);
      const [gasId] = await trx('blood_gases').insert({
        patient_id: patientIds.get(g.mrn),
        bed_id: bedOf.get(g.mrn),
        sampled_at: sampledAt,
        sample_type: g.sampleType,
        ph: g.ph,
        pao2_mmhg: Math.round(kpaToMmHg(g.pao2Kpa) * 10) / 10,
        paco2_mmhg: Math.round(kpaToMmHg(g.paco2Kpa) * 10) / 10,
        entered_unit: 'kPa',
        sao2: g.sao2,
        hco3: g.hco3,
        base_excess: g.baseExcess,
        lactate: g.lactate,
        hb_gdl: g.hbGdl,
        fio2: g.fio2,
        spo2_at_sample: g.spo2AtSample,
        spo2_source: 'entered',
        recorded_by: nurseId,
        recorded_at: new Date(sampledAt.getTime() + 15 * 60_000),
      });
      if (
        gasFlags({ sampleType: g.sampleType, sao2: g.sao2, spo2AtSample: g.spo2AtSample }).includes('occult_hypoxaemia')
      ) {
        const pt = demoPatients.find((x) => x.mrn === g.mrn)!;
        const raisedAt = new Date(sampledAt.getTime() + 15 * 60_000);
        await trx('escalations').insert({
          patient_id: patientIds.get(g.mrn),
          unit_id: unitIds.get(pt.unitCode),
          bed_id: bedOf.get(g.mrn),
          kind: 'occult_hypoxaemia',
          severity: null,
          state: 'raised',
          raised_at: raisedAt,
          run_start: sampledAt,
          run_end: sampledAt,
          notify_count: 0,
          evidence: JSON.stringify({
            rule: 'occult_hypoxaemia',
            nadir: g.sao2,
            urgentReasons: [],
            band: pt.band ? { low: pt.band.low, high: pt.band.high } : null,
            lastReadings: [],
            bloodGas: {
              bloodGasId: Number(gasId),
              sampledAt: sampledAt.getTime(),
              sao2: g.sao2,
              spo2AtSample: g.spo2AtSample,
            },
          }),
        });
      }
    }
    await rebuildAllRollups(trx); // the per-minute rollup every writer keeps, here in one pass
    console.log(
      `seed: ${demoUnits.length} units, ${demoUsers.length} users, ${demoPatients.length + history.patients.length} patients (${history.patients.length} discharged), ${rows.length + pastRows.length} obs, ${history.escalations.length} past escalations`,
    );
  });
}
