import { beforeAll, describe, expect, it } from 'vitest';
import {
  bloodGasResources,
  bundleEntry,
  bundleHead,
  encounterResource,
  goalResource,
  observationResources,
  observationStatus,
  patientResource,
  type ObservationIn,
  type OrderIn,
} from './r4.ts';
import { codeIssues, ensureIndexed, r4Codes, structureIssues } from './validate.ts';

// The R4 structure definitions (several MB of JSON): indexed once, before the clock of any test.
beforeAll(() => {
  ensureIndexed();
  r4Codes('http://hl7.org/fhir/bundle-type');
}, 120_000);

const patient = { id: 7, mrn: 'HG0001234', given_name: 'Ada', family_name: 'Marsh', date_of_birth: '1951-04-09' };
const obs = (over: Partial<ObservationIn> = {}): ObservationIn => ({
  id: 100,
  taken_at: new Date('2026-12-02T06:00:00Z'),
  source: 'charted',
  status: 'current',
  replaces_id: null,
  replaced_by_id: null,
  status_reason: null,
  spo2: 93,
  heart_rate: 98,
  resp_rate: 22,
  fio2: '0.400',
  fio2_estimated: 0,
  flow_lpm: '6.0',
  systolic: 118,
  temperature: '37.4',
  trace: 'clean',
  recorded_by_name: 'Nurse Ward',
  ...over,
});
const order = (id: number, at: string, low = 92, high = 96): OrderIn => ({
  id,
  low,
  high,
  reason: 'COPD with CO₂ retention',
  ordered_by_name: 'Dr Inlet',
  ordered_at: new Date(at),
  news2_scale: 1,
  scale_reason: null,
});

describe('the validator and value-set checks themselves catch bad resources (so a pass means something)', () => {
  it('structure: unknown property, missing required, wrong type, bad dateTime', () => {
    const good = observationResources(obs(), 7)[0]!;
    expect(structureIssues(good)).toEqual([]);
    expect(structureIssues({ ...good, colour: 'blue' })).not.toEqual([]);
    const { code: _code, ...noCode } = good;
    expect(structureIssues(noCode)).not.toEqual([]);
    expect(structureIssues({ ...good, valueQuantity: { value: '93' } })).not.toEqual([]);
    expect(structureIssues({ ...good, effectiveDateTime: '2026-12-02 06:00' })).not.toEqual([]);
  });
  it('codes: a status outside the R4 set passes the validator but not our check', () => {
    const bad = { ...observationResources(obs(), 7)[0]!, status: 'nonsense' };
    expect(structureIssues(bad)).toEqual([]); // STACK.md: validateResource does not check codes
    expect(codeIssues(bad)).not.toEqual([]);
    expect(r4Codes('http://hl7.org/fhir/observation-status').has('corrected')).toBe(true); // nested under "amended"
  });
});

describe('mappers', () => {
  it('Patient: MRN identifier, name, birth date', () => {
    const r = patientResource(patient);
    expect(structureIssues(r)).toEqual([]);
    expect(codeIssues(r)).toEqual([]);
    expect(r).toMatchObject({ id: 'patient-7', birthDate: '1951-04-09', name: [{ family: 'Marsh', given: ['Ada'] }] });
  });

  it('Blood gas: one laboratory Observation per value, LOINC pH 2744-1, PaCO₂ 2019-8, PaO₂ 2703-7, SaO₂ 2708-6 (from memory, REFERENCES.md)', () => {
    const gas = {
      id: 5,
      sampled_at: new Date('2026-12-02T05:40:00Z'),
      sample_type: 'arterial' as const,
      status: 'current' as const,
      replaces_id: null,
      replaced_by_id: null,
      status_reason: null,
      ph: '7.310',
      pao2_mmhg: '63.8',
      paco2_mmhg: '52.5',
      sao2: '85.0',
      recorded_by_name: 'Nurse Ward',
    };
    const rs = bloodGasResources(gas, 7);
    for (const r of rs) {
      expect(structureIssues(r)).toEqual([]);
      expect(codeIssues(r)).toEqual([]);
    }
    const byCode = Object.fromEntries(rs.map((r) => [(r.code as { coding: { code: string }[] }).coding[0]!.code, r]));
    expect(Object.keys(byCode).sort()).toEqual(['2019-8', '2703-7', '2708-6', '2744-1']);
    expect(byCode['2744-1']!.valueQuantity).toEqual({
      value: 7.31,
      unit: '[pH]',
      system: 'http://unitsofmeasure.org',
      code: '[pH]',
    });
    expect(byCode['2703-7']!.valueQuantity).toMatchObject({ value: 63.8, code: 'mm[Hg]' });
    expect(byCode['2708-6']!.valueQuantity).toMatchObject({ value: 85, code: '%' });
    expect(rs.every((r) => r.status === 'final')).toBe(true);
    const wrong = bloodGasResources(
      { ...gas, sample_type: 'venous', status: 'entered_in_error', status_reason: 'wrong patient' },
      7,
    );
    for (const r of wrong) {
      expect(structureIssues(r)).toEqual([]);
      expect(codeIssues(r)).toEqual([]);
    }
    expect(wrong[0]).toMatchObject({
      status: 'entered-in-error',
      note: [{ text: 'A venous sample, not arterial. Entered in error: wrong patient.' }],
    });
  });

  it('Encounter per stay: in progress while open, finished once ended', () => {
    const open = encounterResource(
      {
        id: 3,
        bed_label: 'B04',
        unit_name: 'Level 4 ICU',
        started_at: new Date('2026-12-01T08:00:00Z'),
        ended_at: null,
        end_reason: null,
      },
      7,
    );
    const ended = encounterResource(
      {
        id: 2,
        bed_label: 'B01',
        unit_name: 'Level 4 ICU',
        started_at: new Date('2026-11-30T08:00:00Z'),
        ended_at: new Date('2026-12-01T08:00:00Z'),
        end_reason: 'moved',
      },
      7,
    );
    for (const r of [open, ended]) {
      expect(structureIssues(r)).toEqual([]);
      expect(codeIssues(r)).toEqual([]);
    }
    expect(open.status).toBe('in-progress');
    expect(ended).toMatchObject({ status: 'finished', period: { end: '2026-12-01T08:00:00.000Z' } });
  });

  it('Observations: one per value, LOINC + UCUM as in REFERENCES.md (from memory of the FHIR vital-signs profile)', () => {
    const rs = observationResources(obs({ fio2_estimated: 1 }), 7);
    for (const r of rs) {
      expect(structureIssues(r)).toEqual([]);
      expect(codeIssues(r)).toEqual([]);
    }
    const byCode = Object.fromEntries(rs.map((r) => [(r.code as { coding: { code: string }[] }).coding[0]!.code, r]));
    expect(Object.keys(byCode).sort()).toEqual(['3150-0', '3151-8', '59408-5', '8310-5', '8480-6', '8867-4', '9279-1']);
    expect((byCode['59408-5']!.code as { coding: { code: string }[] }).coding.map((c) => c.code)).toEqual([
      '59408-5',
      '2708-6',
    ]);
    expect(byCode['59408-5']!.valueQuantity).toEqual({
      value: 93,
      unit: '%',
      system: 'http://unitsofmeasure.org',
      code: '%',
    });
    expect(byCode['3150-0']!.valueQuantity).toMatchObject({ value: 40, code: '%' }); // 0.400 fraction → 40 %
    expect(byCode['3150-0']!.note).toEqual([{ text: 'FiO₂ estimated from device and flow, not measured.' }]);
    expect(byCode['3151-8']!.valueQuantity).toMatchObject({ value: 6, code: 'L/min' });
    expect(byCode['8310-5']!.valueQuantity).toMatchObject({ value: 37.4, code: 'Cel' });
    expect(byCode['8480-6']!.valueQuantity).toMatchObject({ value: 118, code: 'mm[Hg]' });
    expect(byCode['8867-4']!.valueQuantity).toMatchObject({ value: 98, code: '/min' });
  });

  it('statuses: final, corrected for a correction, entered-in-error for what it replaced and for entered-in-error and withdrawn rows', () => {
    expect(observationStatus({ status: 'current', replaces_id: null })).toBe('final');
    expect(observationStatus({ status: 'current', replaces_id: 5 })).toBe('corrected');
    expect(observationStatus({ status: 'superseded', replaces_id: null })).toBe('entered-in-error');
    expect(observationStatus({ status: 'entered_in_error', replaces_id: null })).toBe('entered-in-error');
    expect(observationStatus({ status: 'withdrawn', replaces_id: null })).toBe('entered-in-error');
    const original = observationResources(
      obs({ status: 'superseded', replaced_by_id: 101, status_reason: 'wrong patient bay' }),
      7,
    )[0]!;
    expect(original.note).toEqual([{ text: 'Superseded by observation 101: wrong patient bay.' }]);
    const device = observationResources(
      obs({
        source: 'device',
        resp_rate: null,
        fio2: null,
        flow_lpm: null,
        systolic: null,
        temperature: null,
        trace: 'noisy',
        recorded_by_name: null,
      }),
      7,
    );
    expect(device).toHaveLength(2);
    expect(device[0]!.note).toEqual([{ text: 'From a bedside monitor. Trace: noisy.' }]);
    for (const r of [original, ...device]) {
      expect(structureIssues(r)).toEqual([]);
      expect(codeIssues(r)).toEqual([]);
    }
  });

  it('Goal: the band as a detailRange on 59408-5, who ordered it and why; a replaced band is cancelled', () => {
    const older = order(1, '2026-12-01T09:00:00Z', 88, 92);
    const newer = order(2, '2026-12-02T09:00:00Z', 92, 96);
    const g1 = goalResource(older, 7, newer);
    const g2 = goalResource(newer, 7, null);
    for (const r of [g1, g2]) {
      expect(structureIssues(r)).toEqual([]);
      expect(codeIssues(r)).toEqual([]);
    }
    expect(g2).toMatchObject({
      lifecycleStatus: 'active',
      expressedBy: { display: 'Dr Inlet' },
      target: [{ detailRange: { low: { value: 92, code: '%' }, high: { value: 96, code: '%' } } }],
      note: [{ authorString: 'Dr Inlet', time: '2026-12-02T09:00:00.000Z', text: 'COPD with CO₂ retention' }],
    });
    expect(g1).toMatchObject({ lifecycleStatus: 'cancelled', statusDate: '2026-12-02' });
  });

  it('the streamed Bundle head plus entries is one valid collection Bundle', () => {
    const entries = [patientResource(patient), ...observationResources(obs(), 7)].map((r) =>
      JSON.stringify(bundleEntry(r, 'http://127.0.0.1:4321')),
    );
    const bundle = JSON.parse(`${bundleHead('x1', new Date('2026-12-02T10:00:00Z')) + entries.join(',')}]}`);
    expect(bundle.type).toBe('collection');
    expect(bundle.entry).toHaveLength(8);
    expect(structureIssues(bundle)).toEqual([]);
    expect(codeIssues(bundle)).toEqual([]);
  });
});
