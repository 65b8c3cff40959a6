/**
 * Pleth strip check: the strip is parsed and handed to analysePlethStrip (the one computation);
 * this module only shapes the answer for the page and keeps checks attached to a record.
 */
import { createHash } from 'node:crypto';
import { CLINICAL_ROLES, hasRole } from '~/lib/auth/roles.ts';
import { StripFileError, parseStripCsv } from '~/lib/pleth-strips/strip-csv.ts';
import { analysePlethStrip, beerLambertCurve } from '~/lib/oxygenation/index.ts';
import type { StripResult } from '~/lib/pleth-strips/api-types.ts';
import { authorisePatient } from '~/lib/server/charting/patients.ts';
import { ApiError } from '~/lib/server/http.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import {
  attachableReadingsOf,
  insertPlethCheck,
  observationOfPatient,
  plethChecksOf,
} from '~/lib/server/queries/pleth-checks.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';

/** Points per waveform sent to the page: a strip of a minute at 100 Hz is drawn whole. */
const MAX_WAVE_POINTS = 6000;

export function analyseStripText(text: string, sampleRateHz?: number): StripResult {
  let parsed: ReturnType<typeof parseStripCsv>;
  try {
    parsed = parseStripCsv(text, sampleRateHz);
  } catch (err) {
    if (err instanceof StripFileError) throw new ApiError(400, 'invalid_file', err.message, { file: err.message });
    throw err;
  }
  const { strip } = parsed;
  const analysis = analysePlethStrip(strip, beerLambertCurve);
  const step = Math.max(1, Math.ceil(strip.red.length / MAX_WAVE_POINTS));
  const wave = { t: [] as number[], red: [] as number[], infrared: [] as number[] };
  for (let i = 0; i < strip.red.length; i += step) {
    wave.t.push(Math.round((i / strip.sampleRateHz) * 1000) / 1000);
    wave.red.push(strip.red[i]! - strip.dark[i]!);
    wave.infrared.push(strip.infrared[i]! - strip.dark[i]!);
  }
  return {
    analysis,
    curve: { name: beerLambertCurve.name, source: beerLambertCurve.source },
    sampleRateHz: strip.sampleRateHz,
    samples: parsed.samples,
    durationSec: parsed.durationSec,
    wave,
  };
}

export function assertClinician(user: SessionUser): void {
  if (!hasRole(user.role, CLINICAL_ROLES))
    throw new ApiError(403, 'forbidden', 'The strip check is for clinical roles.');
}

/** Nurses and charge nurses of the patient's unit, intensivists and outreach: anyone who reads the chart of an admitted patient. */
async function authoriseAttach(user: SessionUser, patientId: number) {
  assertClinician(user);
  const { stay } = await authorisePatient(user, patientId, 'read');
  if (stay.ended_at !== null)
    throw new ApiError(409, 'not_admitted', 'This patient has been discharged; their record is read-only.');
}

export interface AttachInput {
  patientId: number;
  observationId: number | null;
  fileName: string;
  csv: string;
  sampleRateHz?: number;
  note?: string;
}

export async function attachCheck(user: SessionUser, input: AttachInput, now = new Date()) {
  await authoriseAttach(user, input.patientId);
  if (input.observationId !== null && !(await observationOfPatient(input.observationId, input.patientId))) {
    throw new ApiError(400, 'invalid_input', "That reading is not in this patient's record.", {
      observationId: 'Not a reading of this patient',
    });
  }
  const result = analyseStripText(input.csv, input.sampleRateHz);
  const a = result.analysis;
  const round = (v: number | null, dp: number) => (v === null ? null : Math.round(v * 10 ** dp) / 10 ** dp);
  const id = await withTransactionRetry(async (trx) => {
    const checkId = await insertPlethCheck(trx, {
      patient_id: input.patientId,
      observation_id: input.observationId,
      file_name: input.fileName,
      file_hash: createHash('sha256').update(input.csv).digest('hex'),
      strip_csv: input.csv,
      sample_rate_hz: result.sampleRateHz,
      verdict: a.verdict,
      spo2: round(a.spo2, 1),
      heart_rate: round(a.heartRate, 1),
      perfusion_index: round(a.perfusionIndex, 3),
      r_median: round(a.rMedian, 4),
      reasons: JSON.stringify(a.reasons),
      curve: a.curveName,
      note: input.note ?? null,
      checked_by: user.id,
      checked_at: now,
    });
    await writeAudit(trx, {
      actorId: user.id,
      action: 'pleth.attach',
      entity: 'pleth_check',
      entityId: checkId,
      after: {
        patientId: input.patientId,
        observationId: input.observationId,
        verdict: a.verdict,
        reasons: a.reasons,
        note: input.note ?? null,
      },
      at: now,
    });
    return checkId;
  });
  return (await listChecks(user, input.patientId)).checks.find((c) => c.id === id)!;
}

export async function listChecks(user: SessionUser, patientId: number) {
  assertClinician(user);
  const { stay } = await authorisePatient(user, patientId, 'read');
  const [rows, readings] = await Promise.all([plethChecksOf(patientId), attachableReadingsOf(patientId, 60)]);
  const num = (v: string | number | null) => (v === null ? null : Number(v));
  return {
    timeZone: stay.time_zone,
    checks: rows.map((r) => ({
      id: Number(r.id),
      observationId: r.observation_id === null ? null : Number(r.observation_id),
      fileName: r.file_name,
      verdict: r.verdict,
      /** The words that go beside the reading in the record. */
      summary: `probe trace checked: ${r.verdict}`,
      spo2: num(r.spo2),
      heartRate: num(r.heart_rate),
      perfusionIndex: num(r.perfusion_index),
      rMedian: num(r.r_median),
      reasons: typeof r.reasons === 'string' ? JSON.parse(r.reasons) : r.reasons,
      curve: r.curve,
      note: r.note,
      checkedAt: new Date(r.checked_at).toISOString(),
      checkedBy: r.checked_by_name,
      reading: r.reading_taken_at
        ? { takenAt: new Date(r.reading_taken_at).toISOString(), spo2: r.reading_spo2 }
        : null,
    })),
    readings: readings.map((r) => ({
      id: Number(r.id),
      takenAt: new Date(r.taken_at).toISOString(),
      source: r.source,
      spo2: r.spo2,
      trace: r.trace,
    })),
  };
}
