/**
 * FHIR R4 resources from our rows: one small mapper per resource, so a new kind of record (blood
 * gases, say) is one more mapper and one more loop in the export. Pure: no IO, no clock.
 *
 * Codes (LOINC, UCUM) from ../shared/REFERENCES.md (from memory of the FHIR vital-signs profile).
 */
import { toIso } from '~/lib/time/iso.ts';

export type Resource = { resourceType: string; id: string } & Record<string, unknown>;

export const LOINC = 'http://loinc.org';
export const UCUM = 'http://unitsofmeasure.org';
const OBS_CATEGORY = 'http://terminology.hl7.org/CodeSystem/observation-category';
const ACT_CODE = 'http://terminology.hl7.org/CodeSystem/v3-ActCode';
/** Our own identifier systems (invented URIs under the product's name). */
export const MRN_SYSTEM = 'urn:ebbwatch:mrn';

/** The vital signs we export: LOINC code(s), display, UCUM unit. */
export const VITALS = {
  spo2: {
    codes: [
      ['59408-5', 'Oxygen saturation in Arterial blood by Pulse oximetry'],
      ['2708-6', 'Oxygen saturation in Arterial blood'],
    ],
    unit: '%',
    text: 'SpO₂',
  },
  heartRate: { codes: [['8867-4', 'Heart rate']], unit: '/min', text: 'Heart rate' },
  respRate: { codes: [['9279-1', 'Respiratory rate']], unit: '/min', text: 'Respiratory rate' },
  fio2: { codes: [['3150-0', 'Inhaled oxygen concentration']], unit: '%', text: 'FiO₂' },
  flow: { codes: [['3151-8', 'Inhaled oxygen flow rate']], unit: 'L/min', text: 'Oxygen flow' },
  systolic: { codes: [['8480-6', 'Systolic blood pressure']], unit: 'mm[Hg]', text: 'Systolic blood pressure' },
  temperature: { codes: [['8310-5', 'Body temperature']], unit: 'Cel', text: 'Body temperature' },
} as const;
export type VitalKey = keyof typeof VITALS;

const dateOnly = (d: Date | string) => (typeof d === 'string' ? d.slice(0, 10) : d.toISOString().slice(0, 10));
const num = (v: string | number | null | undefined): number | null =>
  v === null || v === undefined || v === '' ? null : Number(v);

export interface PatientIn {
  id: number;
  mrn: string;
  given_name: string;
  family_name: string;
  date_of_birth: Date | string;
}

export function patientResource(p: PatientIn): Resource {
  return {
    resourceType: 'Patient',
    id: `patient-${p.id}`,
    identifier: [{ use: 'usual', system: MRN_SYSTEM, value: p.mrn }],
    name: [{ use: 'official', family: p.family_name, given: [p.given_name] }],
    birthDate: dateOnly(p.date_of_birth),
  };
}

export interface StayIn {
  id: number;
  bed_label: string;
  unit_name: string;
  started_at: Date;
  ended_at: Date | null;
  end_reason: string | null;
}

/** One Encounter per bed stay: in progress while open, finished once moved or discharged. */
export function encounterResource(s: StayIn, patientId: number): Resource {
  return {
    resourceType: 'Encounter',
    id: `stay-${s.id}`,
    status: s.ended_at ? 'finished' : 'in-progress',
    class: { system: ACT_CODE, code: 'IMP', display: 'inpatient encounter' },
    subject: { reference: `Patient/patient-${patientId}` },
    period: { start: toIso(s.started_at), ...(s.ended_at ? { end: toIso(s.ended_at) } : {}) },
    location: [
      { location: { display: `${s.unit_name}, bed ${s.bed_label}` }, status: s.ended_at ? 'completed' : 'active' },
    ],
  };
}

export interface ObservationIn {
  id: number;
  taken_at: Date;
  source: 'charted' | 'device' | 'import';
  status: 'current' | 'superseded' | 'entered_in_error' | 'withdrawn';
  replaces_id: number | null;
  replaced_by_id: number | null;
  status_reason: string | null;
  spo2: number | null;
  heart_rate: number | null;
  resp_rate: number | null;
  fio2: string | number | null;
  fio2_estimated: number | boolean;
  flow_lpm: string | number | null;
  systolic: number | null;
  temperature: string | number | null;
  trace: string;
  recorded_by_name: string | null;
}

/**
 * Our record's status as an R4 Observation status. A correction is a new row naming the one it
 * replaces: the new row is `corrected`, the original it supersedes `entered-in-error` (its value was
 * declared wrong; the note names the correction and the reason). Entered-in-error and withdrawn
 * (an import taken back) are `entered-in-error`. Everything else is `final`.
 */
export function observationStatus(
  o: Pick<ObservationIn, 'status' | 'replaces_id'>,
): 'final' | 'corrected' | 'entered-in-error' {
  if (o.status === 'current') return o.replaces_id ? 'corrected' : 'final';
  return 'entered-in-error';
}

function statusNote(o: ObservationIn): string | null {
  const parts: string[] = [];
  if (o.source === 'device') parts.push('From a bedside monitor.');
  if (o.source === 'import') parts.push('From a monitor trend file.');
  if (o.trace !== 'clean') parts.push(`Trace: ${o.trace}.`);
  if (o.replaces_id) parts.push(`Corrects observation ${o.replaces_id}.`);
  if (o.status === 'superseded')
    parts.push(`Superseded by observation ${o.replaced_by_id ?? '?'}${o.status_reason ? `: ${o.status_reason}` : ''}.`);
  if (o.status === 'entered_in_error') parts.push(`Entered in error${o.status_reason ? `: ${o.status_reason}` : ''}.`);
  if (o.status === 'withdrawn')
    parts.push(`Withdrawn with its import${o.status_reason ? `: ${o.status_reason}` : ''}.`);
  return parts.length ? parts.join(' ') : null;
}

/** One vital-signs Observation per value in the row (the vital-signs profile's one-code-one-value shape). */
export function observationResources(o: ObservationIn, patientId: number): Resource[] {
  const values: [VitalKey, number | null][] = [
    ['spo2', o.spo2],
    ['heartRate', o.heart_rate],
    ['respRate', o.resp_rate],
    // FiO₂ is stored as a fraction; LOINC 3150-0 is in %.
    ['fio2', num(o.fio2) === null ? null : Math.round(num(o.fio2)! * 1000) / 10],
    ['flow', num(o.flow_lpm)],
    ['systolic', o.systolic],
    ['temperature', num(o.temperature)],
  ];
  const status = observationStatus(o);
  const note = statusNote(o);
  return values
    .filter(([, v]) => v !== null)
    .map(([key, value]) => {
      const def = VITALS[key];
      const notes = [
        note,
        key === 'fio2' && o.fio2_estimated ? 'FiO₂ estimated from device and flow, not measured.' : null,
      ].filter(Boolean) as string[];
      return {
        resourceType: 'Observation',
        id: `obs-${o.id}-${key}`,
        status,
        category: [{ coding: [{ system: OBS_CATEGORY, code: 'vital-signs', display: 'Vital Signs' }] }],
        code: { coding: def.codes.map(([code, display]) => ({ system: LOINC, code, display })), text: def.text },
        subject: { reference: `Patient/patient-${patientId}` },
        effectiveDateTime: toIso(o.taken_at),
        ...(o.recorded_by_name ? { performer: [{ display: o.recorded_by_name }] } : {}),
        valueQuantity: { value: value!, unit: def.unit, system: UCUM, code: def.unit },
        ...(notes.length ? { note: [{ text: notes.join(' ') }] } : {}),
      };
    });
}

/** Blood-gas values we export: LOINC (from memory, REFERENCES.md), display, UCUM unit. */
export const GAS_CODES = {
  ph: { code: '2744-1', display: 'pH of Arterial blood', unit: '[pH]' },
  paco2: { code: '2019-8', display: 'Carbon dioxide [Partial pressure] in Arterial blood', unit: 'mm[Hg]' },
  pao2: { code: '2703-7', display: 'Oxygen [Partial pressure] in Arterial blood', unit: 'mm[Hg]' },
  sao2: { code: '2708-6', display: 'Oxygen saturation in Arterial blood', unit: '%' },
} as const;

export interface BloodGasIn {
  id: number;
  sampled_at: Date;
  sample_type: 'arterial' | 'venous' | 'capillary';
  status: 'current' | 'superseded' | 'entered_in_error';
  replaces_id: number | null;
  replaced_by_id: number | null;
  status_reason: string | null;
  ph: string | number;
  pao2_mmhg: string | number;
  paco2_mmhg: string | number;
  sao2: string | number;
  recorded_by_name: string | null;
}

/**
 * One laboratory Observation per value of a blood gas (pressures in mmHg as stored). The codes are the
 * arterial ones, so venous and capillary samples say so in the text and a note. Status as obs.
 */
export function bloodGasResources(g: BloodGasIn, patientId: number): Resource[] {
  const status = observationStatus(g);
  const parts: string[] = [];
  if (g.sample_type !== 'arterial') parts.push(`A ${g.sample_type} sample, not arterial.`);
  if (g.replaces_id) parts.push(`Corrects blood gas ${g.replaces_id}.`);
  if (g.status === 'superseded')
    parts.push(`Superseded by blood gas ${g.replaced_by_id ?? '?'}${g.status_reason ? `: ${g.status_reason}` : ''}.`);
  if (g.status === 'entered_in_error') parts.push(`Entered in error${g.status_reason ? `: ${g.status_reason}` : ''}.`);
  const values: [keyof typeof GAS_CODES, number | null][] = [
    ['ph', num(g.ph)],
    ['paco2', num(g.paco2_mmhg)],
    ['pao2', num(g.pao2_mmhg)],
    ['sao2', num(g.sao2)],
  ];
  return values
    .filter(([, v]) => v !== null)
    .map(([key, value]) => {
      const def = GAS_CODES[key];
      return {
        resourceType: 'Observation',
        id: `gas-${g.id}-${key}`,
        status,
        category: [{ coding: [{ system: OBS_CATEGORY, code: 'laboratory', display: 'Laboratory' }] }],
        code: {
          coding: [{ system: LOINC, code: def.code, display: def.display }],
          text: `${def.display}${g.sample_type === 'arterial' ? '' : ` (${g.sample_type} sample)`}`,
        },
        subject: { reference: `Patient/patient-${patientId}` },
        effectiveDateTime: toIso(g.sampled_at),
        ...(g.recorded_by_name ? { performer: [{ display: g.recorded_by_name }] } : {}),
        valueQuantity: { value: value!, unit: def.unit, system: UCUM, code: def.unit },
        ...(parts.length ? { note: [{ text: parts.join(' ') }] } : {}),
      };
    });
}

export interface OrderIn {
  id: number;
  low: number;
  high: number;
  reason: string;
  ordered_by_name: string;
  ordered_at: Date;
  news2_scale: 1 | 2;
  scale_reason: string | null;
}

/**
 * A target band as a Goal: SpO₂ (59408-5) within low–high %. The newest order is active; earlier
 * ones were replaced (`cancelled`, with the replacing order named). Who ordered it and why in the note.
 */
export function goalResource(order: OrderIn, patientId: number, replacedBy: OrderIn | null): Resource {
  const pct = (value: number) => ({ value, unit: '%', system: UCUM, code: '%' });
  return {
    resourceType: 'Goal',
    id: `band-${order.id}`,
    lifecycleStatus: replacedBy ? 'cancelled' : 'active',
    ...(replacedBy
      ? {
          statusDate: dateOnly(replacedBy.ordered_at),
          statusReason: `Replaced by the band ordered ${toIso(replacedBy.ordered_at)}`,
        }
      : {}),
    description: { text: `SpO₂ target band ${order.low}–${order.high} %` },
    subject: { reference: `Patient/patient-${patientId}` },
    startDate: dateOnly(order.ordered_at),
    expressedBy: { display: order.ordered_by_name },
    target: [
      {
        measure: { coding: [{ system: LOINC, code: '59408-5', display: VITALS.spo2.codes[0][1] }] },
        detailRange: { low: pct(order.low), high: pct(order.high) },
      },
    ],
    note: [
      {
        authorString: order.ordered_by_name,
        time: toIso(order.ordered_at),
        text: `${order.reason}${order.news2_scale === 2 ? ` (NEWS2 Scale 2${order.scale_reason ? `: ${order.scale_reason}` : ''})` : ''}`,
      },
    ],
  };
}

/** A Bundle entry; fullUrl as urn:uuid-free relative references would not resolve, so we use the resource's own path. */
export function bundleEntry(r: Resource, base: string): { fullUrl: string; resource: Resource } {
  return { fullUrl: `${base}/${r.resourceType}/${r.id}`, resource: r };
}

/** The Bundle's opening, for streaming: entries follow, then `]}`. */
export function bundleHead(id: string, at: Date): string {
  const head = JSON.stringify({
    resourceType: 'Bundle',
    id,
    type: 'collection',
    timestamp: at.toISOString(),
    entry: [],
  });
  return head.slice(0, -2); // drop the closing "]}" of the empty entry list
}
