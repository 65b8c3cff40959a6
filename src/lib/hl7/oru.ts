/**
 * HL7 v2 ORU^R01 from bedside-monitor gateways (the IHE PCD-01 pattern), read into the feed's own
 * batch shape so the one ingest path validates and stores it. Pure: no IO, no clock.
 *
 * Accepted OBX codes, IEEE 11073-10101 nomenclature (codes from memory, see ../shared/REFERENCES.md):
 *   150456 MDC_PULS_OXIM_SAT_O2    SpO₂, unit 262688 MDC_DIM_PERCENT (or UCUM %)
 *   149530 MDC_PULS_OXIM_PULS_RATE pulse rate, unit 264864 MDC_DIM_BEAT_PER_MIN (or UCUM /min)
 *   150488 MDC_PULS_OXIM_PERF_REL  perfusion index, unit 262688 MDC_DIM_PERCENT (or %) — this code from memory
 * Other OBX rows (device hierarchy, other parameters) are passed over.
 */
import { Hl7Message, Hl7Segment } from '@medplum/core';

export const MDC_SPO2 = '150456';
export const MDC_PULSE_RATE = '149530';
/** From memory (the issue asks this be said beside it). */
export const MDC_PERF_REL = '150488';
export const MDC_DIM_PERCENT = '262688';
export const MDC_DIM_BEAT_PER_MIN = '264864';

type Field = 'spo2' | 'heartRate' | 'perfusionIndex';
const CODES: Record<string, { field: Field; name: string; units: string[] }> = {
  [MDC_SPO2]: { field: 'spo2', name: 'SpO₂', units: [MDC_DIM_PERCENT, '%'] },
  [MDC_PULSE_RATE]: { field: 'heartRate', name: 'Pulse rate', units: [MDC_DIM_BEAT_PER_MIN, '/min', '{beats}/min'] },
  [MDC_PERF_REL]: { field: 'perfusionIndex', name: 'Perfusion index', units: [MDC_DIM_PERCENT, '%'] },
};
export const ACCEPTED_CODES = Object.entries(CODES).map(([code, c]) => ({ code, name: c.name, units: c.units }));

/**
 * HL7 table 0357 message error codes (from memory of the HL7 v2.5 tables): the ones we answer with.
 */
export const HL7_ERROR = {
  segmentSequence: ['100', 'Segment sequence error'],
  requiredMissing: ['101', 'Required field missing'],
  dataType: ['102', 'Data type error'],
  tableValue: ['103', 'Table value not found'],
  unsupportedMessage: ['200', 'Unsupported message type'],
  unsupportedEvent: ['201', 'Unsupported event code'],
  unknownKey: ['204', 'Unknown key identifier'],
  internal: ['207', 'Application internal error'],
} as const;
export type Hl7ErrorKind = keyof typeof HL7_ERROR;

/** Why a message is refused. AR: the message as a whole (type, sender, framing); AE: its content. */
export interface Hl7Problem {
  ack: 'AE' | 'AR';
  kind: Hl7ErrorKind;
  reason: string;
  location?: string;
}

export interface OruContent {
  application: string;
  facility: string;
  controlId: string;
  /** PV1-3 as sent: point of care^room^bed (trailing empty parts dropped). */
  bedName: string;
  /** The feed's batch, `{ readings: [...] }`, for the shared validation. */
  batch: { readings: { at: string; spo2?: number; heartRate?: number; perfusionIndex?: number }[] };
  /** For each reading, the OBX set IDs it came from (to name them in a refusal). */
  sources: string[][];
}

export type OruResult = { ok: true; value: OruContent } | { ok: false; problem: Hl7Problem };

const fail = (ack: 'AE' | 'AR', kind: Hl7ErrorKind, reason: string, location?: string): OruResult => ({
  ok: false,
  problem: { ack, kind, reason, location },
});

/**
 * HL7 DTM (YYYYMMDDHHMM[SS[.S…]][+/-ZZZZ]) to ISO 8601 with its offset. Minutes at least; without an
 * offset the message header's offset is used, else null (a time without an offset is ambiguous).
 */
export function hl7TimeToIso(text: string, fallbackOffset?: string | null): string | null {
  const m = /^(\d{4})(\d{2})(\d{2})(\d{2})(\d{2})(?:(\d{2})(?:\.(\d{1,4}))?)?([+-]\d{4})?$/.exec(text.trim());
  if (!m) return null;
  const [, y, mo, d, h, mi, s = '00', frac, off] = m;
  const offset = off ?? fallbackOffset ?? null;
  if (!offset) return null;
  // A calendar check of our own: Date would roll 2026-11-31 over into December.
  const probe = new Date(Date.UTC(Number(y), Number(mo) - 1, Number(d), Number(h), Number(mi), Number(s)));
  if (
    probe.getUTCMonth() !== Number(mo) - 1 ||
    probe.getUTCDate() !== Number(d) ||
    probe.getUTCHours() !== Number(h) ||
    probe.getUTCMinutes() !== Number(mi) ||
    probe.getUTCSeconds() !== Number(s)
  )
    return null;
  if (Number(offset.slice(1, 3)) > 14 || Number(offset.slice(3)) > 59) return null;
  const ms = frac ? `.${frac.padEnd(3, '0').slice(0, 3)}` : '';
  return `${y}-${mo}-${d}T${h}:${mi}:${s}${ms}${offset.slice(0, 3)}:${offset.slice(3)}`;
}

/** The offset part of an HL7 DTM, if any. */
function offsetOf(text: string): string | null {
  return /([+-]\d{4})$/.exec(text.trim())?.[1] ?? null;
}

const NUMBER = /^[+-]?\d+(?:\.\d+)?$/;

export function readOru(msg: Hl7Message): OruResult {
  const msh = msg.segments[0];
  if (msh?.name !== 'MSH')
    return fail('AR', 'segmentSequence', 'The message does not start with an MSH segment', 'MSH');
  const controlId = msh.getField(10)?.toString() ?? '';
  if (!controlId) return fail('AR', 'requiredMissing', 'MSH-10 (message control ID) is missing', 'MSH^1^10');
  const type = msh.getComponent(9, 1);
  const event = msh.getComponent(9, 2);
  if (type !== 'ORU')
    return fail(
      'AR',
      'unsupportedMessage',
      `Message type ${type || '(none)'}^${event} is not handled; send ORU^R01`,
      'MSH^1^9',
    );
  if (event !== 'R01')
    return fail('AR', 'unsupportedEvent', `Event ${event || '(none)'} is not handled; send ORU^R01`, 'MSH^1^9');
  const application = msh.getComponent(3, 1).trim();
  const facility = msh.getComponent(4, 1).trim();
  if (!application)
    return fail(
      'AR',
      'requiredMissing',
      'MSH-3 (sending application) is missing: the gateway is not known without it',
      'MSH^1^3',
    );
  const mshTime = msh.getField(7)?.toString() ?? '';
  const mshOffset = offsetOf(mshTime);

  for (const seg of msg.segments) {
    if (!/^[A-Z][A-Z0-9]{2}$/.test(seg.name))
      return fail('AE', 'segmentSequence', `Malformed segment "${seg.name.slice(0, 20)}"`, seg.name.slice(0, 3));
  }
  const pv1s = msg.segments.filter((s) => s.name === 'PV1');
  if (pv1s.length === 0) return fail('AE', 'requiredMissing', 'No PV1 segment: the bed (PV1-3) is required', 'PV1');
  if (pv1s.length > 1) return fail('AE', 'segmentSequence', 'One patient visit (PV1) per message', 'PV1');
  const pv1 = pv1s[0]!;
  const parts = [1, 2, 3].map((c) => pv1.getComponent(3, c).trim());
  while (parts.length && parts[parts.length - 1] === '') parts.pop();
  const bedName = parts.join('^');
  if (!bedName) return fail('AE', 'requiredMissing', 'PV1-3 (point of care^room^bed) is empty', 'PV1^1^3');

  const byTime = new Map<
    string,
    { at: string; spo2?: number; heartRate?: number; perfusionIndex?: number; obx: string[] }
  >();
  let obrTime = '';
  let obxSeen = 0;
  for (const seg of msg.segments) {
    if (seg.name === 'OBR') {
      obrTime = seg.getField(7)?.toString() ?? '';
      continue;
    }
    if (seg.name !== 'OBX') continue;
    obxSeen++;
    const setId = seg.getField(1)?.toString() || String(obxSeen);
    const where = (f: number) => `OBX^${setId}^${f}`;
    const code = seg.getComponent(3, 1).trim();
    const def = CODES[code];
    if (!def) continue; // device hierarchy rows and parameters we do not chart
    const status = seg.getField(11)?.toString().trim() ?? '';
    if (status === 'X' || status === 'W' || status === 'D') continue; // cannot be obtained / wrong / deleted: no value to store
    const valueType = seg.getField(2)?.toString().trim() ?? '';
    if (valueType !== 'NM')
      return fail('AE', 'dataType', `OBX ${setId} (${def.name}): value type must be NM, not "${valueType}"`, where(2));
    const text = seg.getField(5)?.toString().trim() ?? '';
    if (!NUMBER.test(text))
      return fail('AE', 'dataType', `OBX ${setId} (${def.name}): "${text.slice(0, 20)}" is not a number`, where(5));
    const unit = seg.getComponent(6, 1).trim();
    if (!def.units.includes(unit))
      return fail(
        'AE',
        'tableValue',
        `OBX ${setId} (${def.name}): unit "${unit}" is not ${def.units.join(' or ')}`,
        where(6),
      );
    const own = seg.getField(14)?.toString().trim() ?? '';
    const raw = own || obrTime.trim() || mshTime.trim();
    const at = raw ? hl7TimeToIso(raw, mshOffset) : null;
    if (!raw)
      return fail(
        'AE',
        'requiredMissing',
        `OBX ${setId} (${def.name}): no observation time (OBX-14, OBR-7 or MSH-7)`,
        where(14),
      );
    if (!at)
      return fail(
        'AE',
        'dataType',
        `OBX ${setId} (${def.name}): time "${raw.slice(0, 30)}" is not a real date and time with a UTC offset (YYYYMMDDHHMM[SS][+ZZZZ])`,
        own ? where(14) : obrTime ? 'OBR^1^7' : 'MSH^1^7',
      );
    const key = new Date(at).toISOString();
    let r = byTime.get(key);
    if (!r) {
      r = { at, obx: [] };
      byTime.set(key, r);
    }
    if (r[def.field] !== undefined)
      return fail('AE', 'segmentSequence', `OBX ${setId}: a second ${def.name} for the same time`, where(3));
    r[def.field] = Number(text);
    r.obx.push(setId);
  }
  if (byTime.size === 0) {
    return fail(
      'AE',
      'requiredMissing',
      `No OBX with SpO₂ (${MDC_SPO2}), pulse rate (${MDC_PULSE_RATE}) or perfusion index (${MDC_PERF_REL})`,
      'OBX',
    );
  }
  const readings = [...byTime.values()].sort((a, b) => Date.parse(a.at) - Date.parse(b.at));
  return {
    ok: true,
    value: {
      application,
      facility,
      controlId,
      bedName,
      batch: { readings: readings.map(({ obx: _obx, ...r }) => r) },
      sources: readings.map((r) => r.obx),
    },
  };
}

/** HL7 escape sequences for free text inside a field. */
export function escapeHl7(text: string): string {
  return text
    .replace(/\\/g, '\\E\\')
    .replace(/\|/g, '\\F\\')
    .replace(/\^/g, '\\S\\')
    .replace(/&/g, '\\T\\')
    .replace(/~/g, '\\R\\')
    .replace(/[\r\n]+/g, ' ');
}

/**
 * The ACK: MSA-1 AA / AE / AR, MSA-2 the control ID, MSA-3 the reason in words (80 characters, the
 * field's length in v2.5), and on refusal an ERR segment (ERR-2 location, ERR-3 HL7 error code,
 * ERR-4 severity E, ERR-8 the whole reason).
 */
export function buildAck(msg: Hl7Message, ack: 'AA' | 'AE' | 'AR', text: string, problem?: Hl7Problem): Hl7Message {
  const errSegment = problem ? errSegmentFor(problem) : undefined;
  const out = msg.buildAck({ ackCode: ack, errSegment });
  out.setSegment(
    'MSA',
    new Hl7Segment(['MSA', ack, msg.header.getField(10)?.toString() ?? '', escapeHl7(text.slice(0, 80))]),
  );
  return out;
}

function errSegmentFor(p: Hl7Problem): Hl7Segment {
  const [code, name] = HL7_ERROR[p.kind];
  return new Hl7Segment(['ERR', '', p.location ?? '', `${code}^${name}^HL70357`, 'E', '', '', '', escapeHl7(p.reason)]);
}

/** When the framing held no parseable message at all: an ACK with no control ID to echo. */
export function bareRejectAck(reason: string, now: Date, controlId: string): string {
  const ts = hl7Timestamp(now);
  return [
    `MSH|^~\\&|EBBWATCH|EBBWATCH|||${ts}||ACK|${controlId}|P|2.6`,
    `MSA|AR||${escapeHl7(reason.slice(0, 80))}`,
    `ERR|||${HL7_ERROR.segmentSequence[0]}^${HL7_ERROR.segmentSequence[1]}^HL70357|E||||${escapeHl7(reason)}`,
  ].join('\r');
}

/** A UTC HL7 timestamp with milliseconds and +0000. */
export function hl7Timestamp(d: Date): string {
  const iso = d.toISOString(); // 2026-12-02T10:15:00.123Z
  return `${iso.slice(0, 4)}${iso.slice(5, 7)}${iso.slice(8, 10)}${iso.slice(11, 13)}${iso.slice(14, 16)}${iso.slice(17, 19)}.${iso.slice(20, 23)}+0000`;
}

export interface OruReading {
  at: Date;
  spo2?: number | null;
  heartRate?: number | null;
  perfusionIndex?: number | null;
}

/**
 * An ORU^R01 as a PCD-01 gateway would send it: one OBR, an OBX per value with its own OBX-14.
 * Used by the demo feeder, the tests and the benchmark.
 */
export function buildOru(o: {
  application: string;
  facility: string;
  controlId: string;
  bedName: string;
  readings: OruReading[];
  sentAt: Date;
}): Hl7Message {
  const lines = [
    `MSH|^~\\&|${o.application}|${o.facility}|EBBWATCH|EBBWATCH|${hl7Timestamp(o.sentAt)}||ORU^R01^ORU_R01|${o.controlId}|P|2.6|||AL|NE`,
    'PID|1',
    `PV1|1|I|${o.bedName}`,
    `OBR|1|||182777000^monitoring of patient^SNOMED-CT|||${hl7Timestamp(o.readings[0]?.at ?? o.sentAt)}`,
  ];
  let n = 0;
  for (const r of o.readings) {
    const t = hl7Timestamp(r.at);
    if (r.spo2 != null)
      lines.push(
        `OBX|${++n}|NM|${MDC_SPO2}^MDC_PULS_OXIM_SAT_O2^MDC|1.1.1.1|${r.spo2}|${MDC_DIM_PERCENT}^MDC_DIM_PERCENT^MDC|||||R|||${t}`,
      );
    if (r.heartRate != null)
      lines.push(
        `OBX|${++n}|NM|${MDC_PULSE_RATE}^MDC_PULS_OXIM_PULS_RATE^MDC|1.1.1.2|${r.heartRate}|${MDC_DIM_BEAT_PER_MIN}^MDC_DIM_BEAT_PER_MIN^MDC|||||R|||${t}`,
      );
    if (r.perfusionIndex != null)
      lines.push(
        `OBX|${++n}|NM|${MDC_PERF_REL}^MDC_PULS_OXIM_PERF_REL^MDC|1.1.1.3|${r.perfusionIndex}|${MDC_DIM_PERCENT}^MDC_DIM_PERCENT^MDC|||||R|||${t}`,
      );
  }
  return Hl7Message.parse(lines.join('\r'));
}
