import { describe, expect, it } from 'vitest';
import { Hl7Message } from '@medplum/core';
import { buildAck, buildOru, escapeHl7, hl7TimeToIso, readOru } from './oru.ts';

const seg = (...lines: string[]) => Hl7Message.parse(lines.join('\r'));
const MSH = 'MSH|^~\\&|GW1|ICU4|EBBWATCH|EBBWATCH|20261202101500+0100||ORU^R01^ORU_R01|C1|P|2.6';
// IEEE 11073-10101 codes from memory (../shared/REFERENCES.md, Device interfaces): 150456 SpO₂,
// 149530 pulse rate, 150488 perfusion index; units 262688 percent, 264864 beats per minute.
const SPO2 = (v: string, t = '', id = '1') =>
  `OBX|${id}|NM|150456^MDC_PULS_OXIM_SAT_O2^MDC||${v}|262688^MDC_DIM_PERCENT^MDC|||||R|||${t}`;
const PULSE = (v: string, t = '', id = '2') =>
  `OBX|${id}|NM|149530^MDC_PULS_OXIM_PULS_RATE^MDC||${v}|264864^MDC_DIM_BEAT_PER_MIN^MDC|||||R|||${t}`;
const PI = (v: string, t = '', id = '3') =>
  `OBX|${id}|NM|150488^MDC_PULS_OXIM_PERF_REL^MDC||${v}|262688^MDC_DIM_PERCENT^MDC|||||R|||${t}`;

describe('hl7TimeToIso', () => {
  it('keeps the offset, takes the fallback offset, needs one', () => {
    expect(hl7TimeToIso('20261202101500+0100')).toBe('2026-12-02T10:15:00+01:00');
    expect(hl7TimeToIso('20261202101500.25-0500')).toBe('2026-12-02T10:15:00.250-05:00');
    expect(hl7TimeToIso('202612021015', '+0000')).toBe('2026-12-02T10:15:00+00:00');
    expect(hl7TimeToIso('20261202101500')).toBeNull();
  });
  it('refuses impossible dates and times', () => {
    expect(hl7TimeToIso('20261131101500+0000')).toBeNull();
    expect(hl7TimeToIso('20261202246000+0000')).toBeNull();
    expect(hl7TimeToIso('2026120210+0000')).toBeNull();
    expect(hl7TimeToIso('yesterday')).toBeNull();
  });
});

describe('readOru', () => {
  it('reads one reading per time, codes mapped to the feed fields; OBX-14 first', () => {
    const r = readOru(
      seg(
        MSH,
        'PID|1',
        'PV1|1|I|ICU4^^B03',
        'OBR|1||||||20261202101400+0100',
        SPO2('94', '20261202101455+0100'),
        PULSE('88', '20261202101455+0100'),
        PI('1.8', '20261202101455+0100'),
        SPO2('93', '', '4'),
      ),
    );
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.bedName).toBe('ICU4^^B03');
    expect(r.value.application).toBe('GW1');
    expect(r.value.facility).toBe('ICU4');
    // OBX 4 has no OBX-14: OBR-7 gives its time.
    expect(r.value.batch.readings).toEqual([
      { at: '2026-12-02T10:14:00+01:00', spo2: 93 },
      { at: '2026-12-02T10:14:55+01:00', spo2: 94, heartRate: 88, perfusionIndex: 1.8 },
    ]);
    expect(r.value.sources).toEqual([['4'], ['1', '2', '3']]);
  });

  it('falls back to MSH-7 when neither OBX-14 nor OBR-7 is given, and uses its offset for times without one', () => {
    const r = readOru(seg(MSH, 'PV1|1|I|ICU4^^B03', 'OBR|1', SPO2('95'), PULSE('70', '20261202101230')));
    expect(r.ok && r.value.batch.readings).toEqual([
      { at: '2026-12-02T10:12:30+01:00', heartRate: 70 },
      { at: '2026-12-02T10:15:00+01:00', spo2: 95 },
    ]);
  });

  it('passes over codes it does not chart and rows without a value (status X)', () => {
    const r = readOru(
      seg(
        MSH,
        'PV1|1|I|B1',
        'OBX|1||69965^MDC_DEV_MON_PHYSIO_MULTI_PARAM_MDS^MDC|1',
        'OBX|2|NM|150021^MDC_PRESS_BLD_NONINV_SYS^MDC||120|266016^MDC_DIM_MMHG^MDC',
        SPO2('', '20261202101500+0100', '3').replace('|||||R|', '|||||X|'),
        SPO2('96', '', '4'),
      ),
    );
    expect(r.ok && r.value.batch.readings).toEqual([{ at: '2026-12-02T10:15:00+01:00', spo2: 96 }]);
  });

  const refused = (...lines: string[]) => {
    const r = readOru(seg(...lines));
    if (r.ok) throw new Error('expected a refusal');
    return r.problem;
  };

  it('refuses message types it does not handle with AR', () => {
    expect(refused(MSH.replace('ORU^R01^ORU_R01', 'ADT^A01^ADT_A01'), 'PV1|1|I|B1', SPO2('95'))).toMatchObject({
      ack: 'AR',
      kind: 'unsupportedMessage',
    });
    expect(refused(MSH.replace('ORU^R01^ORU_R01', 'ORU^R30'), 'PV1|1|I|B1', SPO2('95'))).toMatchObject({
      ack: 'AR',
      kind: 'unsupportedEvent',
    });
    expect(refused(MSH.replace('|C1|', '||'), 'PV1|1|I|B1', SPO2('95'))).toMatchObject({
      ack: 'AR',
      kind: 'requiredMissing',
    });
    expect(refused(MSH.replace('|GW1|', '||'), 'PV1|1|I|B1', SPO2('95'))).toMatchObject({
      ack: 'AR',
      kind: 'requiredMissing',
      location: 'MSH^1^3',
    });
  });

  it('refuses bad content with AE and names the field', () => {
    expect(refused(MSH, SPO2('95'))).toMatchObject({ ack: 'AE', location: 'PV1' });
    expect(refused(MSH, 'PV1|1|I|', SPO2('95'))).toMatchObject({ ack: 'AE', location: 'PV1^1^3' });
    expect(refused(MSH, 'PV1|1|I|B1', 'PV1|1|I|B2', SPO2('95'))).toMatchObject({ ack: 'AE' });
    expect(refused(MSH, 'PV1|1|I|B1', 'obx|1|NM')).toMatchObject({ ack: 'AE', kind: 'segmentSequence' });
    expect(refused(MSH, 'PV1|1|I|B1', SPO2('ninety'))).toMatchObject({
      ack: 'AE',
      kind: 'dataType',
      location: 'OBX^1^5',
    });
    expect(refused(MSH, 'PV1|1|I|B1', SPO2('95').replace('|NM|', '|ST|'))).toMatchObject({
      ack: 'AE',
      kind: 'dataType',
      location: 'OBX^1^2',
    });
    expect(
      refused(MSH, 'PV1|1|I|B1', SPO2('95').replace('262688^MDC_DIM_PERCENT', '264864^MDC_DIM_BEAT_PER_MIN')),
    ).toMatchObject({ ack: 'AE', kind: 'tableValue', location: 'OBX^1^6' });
    expect(refused(MSH, 'PV1|1|I|B1', SPO2('95', '20261131101500+0000'))).toMatchObject({
      ack: 'AE',
      kind: 'dataType',
      location: 'OBX^1^14',
    });
    expect(refused(MSH.replace('20261202101500+0100', ''), 'PV1|1|I|B1', SPO2('95'))).toMatchObject({
      ack: 'AE',
      kind: 'requiredMissing',
    });
    expect(refused(MSH, 'PV1|1|I|B1', SPO2('95'), SPO2('94', '', '2'))).toMatchObject({
      ack: 'AE',
      location: 'OBX^2^3',
    });
    expect(refused(MSH, 'PV1|1|I|B1', 'OBX|1|NM|150021^MDC_PRESS_BLD_NONINV_SYS^MDC||120')).toMatchObject({
      ack: 'AE',
      location: 'OBX',
    });
  });
});

describe('ACK', () => {
  const msg = seg(MSH, 'PV1|1|I|B1', SPO2('95'));
  it('AA echoes the control ID, the reason in MSA-3, no ERR', () => {
    const ack = buildAck(msg, 'AA', '1 stored');
    expect(ack.getSegment('MSA')!.toString()).toBe('MSA|AA|C1|1 stored');
    expect(ack.getSegment('ERR')).toBeUndefined();
    expect(ack.header.getComponent(9, 1)).toBe('ACK');
  });
  it('AE and AR carry the reason in MSA-3 (escaped) and an ERR segment with location, code and severity', () => {
    const ack = buildAck(msg, 'AE', 'OBX 1: SpO₂ over 100 | not plausible', {
      ack: 'AE',
      kind: 'dataType',
      reason: 'OBX 1: SpO₂ over 100 | not plausible',
      location: 'OBX^1^5',
    });
    expect(ack.getSegment('MSA')!.toString()).toBe('MSA|AE|C1|OBX 1: SpO₂ over 100 \\F\\ not plausible');
    const err = ack.getSegment('ERR')!;
    expect(err.getField(2).toString()).toBe('OBX^1^5');
    expect(err.getComponent(3, 1)).toBe('102');
    expect(err.getField(4).toString()).toBe('E');
    // Round trip through the wire form.
    expect(Hl7Message.parse(ack.toString()).getSegment('MSA')!.getField(1).toString()).toBe('AE');
  });
  it('escapes every HL7 delimiter', () => {
    expect(escapeHl7('a|b^c~d\\e&f')).toBe('a\\F\\b\\S\\c\\R\\d\\E\\e\\T\\f');
  });
});

describe('buildOru', () => {
  it('writes what readOru reads back', () => {
    const at = new Date('2026-12-02T09:00:01.000Z');
    const m = buildOru({
      application: 'GW',
      facility: 'F',
      controlId: 'X1',
      bedName: 'ICU4^^B01',
      sentAt: at,
      readings: [{ at, spo2: 91, heartRate: 101, perfusionIndex: 0.6 }],
    });
    const r = readOru(Hl7Message.parse(m.toString()));
    expect(r.ok && r.value.batch.readings).toEqual([
      { at: '2026-12-02T09:00:01.000+00:00', spo2: 91, heartRate: 101, perfusionIndex: 0.6 },
    ]);
  });
});
