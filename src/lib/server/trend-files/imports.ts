/**
 * Monitor trend files: preview (nothing stored), commit as one import (who, when, file name and
 * hash; the same file twice is refused while it stands), withdraw (readings marked, never deleted).
 * The file is sent again with the commit and parsed the same way, so what is stored is exactly
 * what the preview showed for that file (the hash ties the two).
 */
import type { ImportView, TrendPreview } from '~/lib/imports/api-types.ts';
import { toIso } from '~/lib/time/iso.ts';
import { stayAt } from '~/lib/patients/stays.ts';
import type { TrendMapping } from '~/lib/imports/mapping.ts';
import { TrendFileError, groupRefusals, parseTrendCsv, type TrendRow } from '~/lib/imports/trend-csv.ts';
import { runObservationHooks } from '~/lib/server/charting/observations.ts';
import { refreshMinuteRollup } from '~/lib/server/queries/rollup.ts';
import { lockPatient } from '~/lib/server/queries/patients.ts';
import { authorisePatient } from '~/lib/server/charting/patients.ts';
import { ApiError } from '~/lib/server/http.ts';
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import {
  activeImportOfFile,
  findImport,
  importsOf,
  insertImport,
  insertImportReadings,
  lockImport,
  markImportWithdrawn,
  readingSecondsBetween,
  saveUnitMapping,
  unitMapping,
  withdrawImportReadings,
  type ImportListRow,
} from '~/lib/server/queries/trend-imports.ts';
import { staysOf, type StayRow } from '~/lib/server/queries/patients.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import type { UploadedFile } from '~/lib/server/upload-body.ts';
import { formatDateTime } from '~/lib/time/format.ts';

/** How many refused rows and examples the preview lists in full (the counts are always exact). */
const LIST_LIMIT = 200;
const FUTURE_SLACK_MS = 2 * 60_000;

export function importView(r: ImportListRow): ImportView {
  return {
    id: Number(r.id),
    patientId: r.patient_id,
    fileName: r.file_name,
    fileHash: r.file_hash,
    fileBytes: r.file_bytes,
    rowsInFile: r.rows_in_file,
    rowsStored: r.rows_stored,
    rowsSkipped: r.rows_skipped,
    rowsRefused: r.rows_refused,
    firstAt: toIso(r.first_at),
    lastAt: toIso(r.last_at),
    committedAt: toIso(r.committed_at)!,
    committedBy: r.committed_by_name,
    withdrawnAt: toIso(r.withdrawn_at),
    withdrawnBy: r.withdrawn_by_name,
    withdrawReason: r.withdraw_reason,
  };
}

interface Plan {
  preview: TrendPreview;
  store: TrendRow[];
  stays: StayRow[];
}

async function plan(
  user: SessionUser,
  patientId: number,
  file: UploadedFile,
  mapping: TrendMapping,
  now: Date,
): Promise<Plan & { stay: StayRow }> {
  const { stay } = await authorisePatient(user, patientId, 'chart');
  let parsed: ReturnType<typeof parseTrendCsv>;
  try {
    parsed = parseTrendCsv(file.text, mapping, stay.time_zone);
  } catch (err) {
    if (err instanceof TrendFileError)
      throw new ApiError(400, 'invalid_file', err.message, { [err.field]: err.message });
    throw err;
  }
  const stays = await staysOf(patientId);
  let first = Infinity;
  let last = -Infinity;
  for (const r of parsed.rows) {
    if (r.at < first) first = r.at;
    if (r.at > last) last = r.at;
  }
  const existing = parsed.rows.length
    ? await readingSecondsBetween(patientId, new Date(first), new Date(last))
    : new Set<number>();
  const outside: TrendRow[] = [];
  const overlapping: TrendRow[] = [];
  const store: TrendRow[] = [];
  for (const r of parsed.rows) {
    if (!stayAt(stays, r.at, now.getTime() + FUTURE_SLACK_MS)) outside.push(r);
    else if (existing.has(Math.floor(r.at / 1000))) overlapping.push(r);
    else store.push(r);
  }
  const earlier = await activeImportOfFile(file.hash);
  const example = (rows: TrendRow[]) =>
    rows.slice(0, LIST_LIMIT).map((r) => ({ line: r.line, at: new Date(r.at).toISOString() }));
  return {
    stay,
    stays,
    store,
    preview: {
      fileName: file.name,
      fileHash: file.hash,
      fileBytes: file.bytes.length,
      timeZone: stay.time_zone,
      headers: parsed.headers,
      rowCount: parsed.rowCount,
      readable: parsed.rows.length,
      toStore: store.length,
      span: parsed.rows.length ? { first: new Date(first).toISOString(), last: new Date(last).toISOString() } : null,
      outsideAdmission: { count: outside.length, examples: example(outside) },
      overlapping: { count: overlapping.length, examples: example(overlapping) },
      refused: {
        count: parsed.refused.length,
        rows: parsed.refused.slice(0, LIST_LIMIT),
        groups: groupRefusals(parsed.refused),
      },
      notes: parsed.notes.slice(0, LIST_LIMIT),
      unfitColumns: parsed.unfitColumns,
      alreadyImported: earlier
        ? {
            importId: Number(earlier.id),
            committedAt: toIso(earlier.committed_at)!,
            committedBy: earlier.committed_by_name,
            samePatient: earlier.patient_id === patientId,
          }
        : null,
    },
  };
}

export async function previewTrend(
  user: SessionUser,
  patientId: number,
  file: UploadedFile,
  mapping: TrendMapping,
  now = new Date(),
): Promise<TrendPreview> {
  return (await plan(user, patientId, file, mapping, now)).preview;
}

function duplicateFile(p: NonNullable<TrendPreview['alreadyImported']>, timeZone: string): ApiError {
  return new ApiError(
    409,
    'duplicate_file',
    `This file was already imported${p.samePatient ? '' : ' to another patient'} (import ${p.importId}, ${formatDateTime(p.committedAt, timeZone)} by ${p.committedBy}). Withdraw that import first if it went wrong.`,
  );
}

export async function commitTrend(
  user: SessionUser,
  patientId: number,
  file: UploadedFile,
  mapping: TrendMapping,
  expectHash: string | undefined,
  now = new Date(),
): Promise<{ import: ImportView; preview: TrendPreview }> {
  if (expectHash && expectHash !== file.hash) {
    throw new ApiError(409, 'file_changed', 'This is not the file that was previewed; preview it again.');
  }
  const { preview, store, stays, stay } = await plan(user, patientId, file, mapping, now);
  if (preview.alreadyImported) throw duplicateFile(preview.alreadyImported, stay.time_zone);
  if (store.length === 0)
    throw new ApiError(400, 'nothing_to_store', 'No reading in this file can be stored (see the preview for why).');
  let firstStored = Infinity;
  let lastStored = -Infinity;
  for (const r of store) {
    if (r.at < firstStored) firstStored = r.at;
    if (r.at > lastStored) lastStored = r.at;
  }
  let id: number;
  try {
    id = await withTransactionRetry(async (trx) => {
      await lockPatient(trx, patientId); // same lock order as every obs writer
      const importId = await insertImport(trx, {
        patient_id: patientId,
        unit_id: stay.unit_id,
        file_name: file.name,
        file_hash: file.hash,
        file_bytes: file.bytes.length,
        rows_in_file: preview.rowCount,
        rows_stored: store.length,
        rows_skipped: preview.outsideAdmission.count + preview.overlapping.count,
        rows_refused: preview.refused.count,
        first_at: new Date(firstStored),
        last_at: new Date(lastStored),
        mapping: JSON.stringify(mapping),
        committed_by: user.id,
        committed_at: now,
      });
      await insertImportReadings(
        trx,
        store.map((r) => ({
          patient_id: patientId,
          bed_id: stayAt(stays, r.at, now.getTime() + FUTURE_SLACK_MS)?.bed_id ?? null,
          taken_at: new Date(r.at),
          source: 'import' as const,
          spo2: r.spo2,
          heart_rate: r.heartRate,
          perfusion_index: r.perfusionIndex,
          trace: r.trace,
          import_id: importId,
          recorded_by: user.id,
          recorded_at: now,
        })),
      );
      await saveUnitMapping(trx, stay.unit_id, mapping, user.id, now);
      await writeAudit(trx, {
        actorId: user.id,
        action: 'import.commit',
        entity: 'observation_import',
        entityId: importId,
        after: {
          patientId,
          fileName: file.name,
          fileHash: file.hash,
          rowsStored: store.length,
          rowsSkipped: preview.outsideAdmission.count + preview.overlapping.count,
          rowsRefused: preview.refused.count,
          mapping,
        },
        at: now,
      });
      await refreshMinuteRollup(trx, patientId, firstStored, lastStored);
      await runObservationHooks(trx, patientId, now);
      return importId;
    });
  } catch (err) {
    // Two commits of one file at once: the unique index on the standing file hash settles it.
    if ((err as { code?: string }).code === 'ER_DUP_ENTRY') {
      const earlier = await activeImportOfFile(file.hash);
      if (earlier)
        throw duplicateFile(
          {
            importId: Number(earlier.id),
            committedAt: toIso(earlier.committed_at)!,
            committedBy: earlier.committed_by_name,
            samePatient: earlier.patient_id === patientId,
          },
          stay.time_zone,
        );
    }
    throw err;
  }
  return { import: importView((await findImport(id))!), preview };
}

export async function withdrawImport(
  user: SessionUser,
  importId: number,
  reason: string,
  now = new Date(),
): Promise<ImportView & { readingsWithdrawn: number }> {
  const marked = await withTransactionRetry(async (trx) => {
    const unlocked = await findImport(importId);
    if (unlocked) await lockPatient(trx, unlocked.patient_id); // patient first, as every obs writer
    const imp = await lockImport(trx, importId);
    if (!imp) throw new ApiError(404, 'not_found', 'No import with that id.');
    await authorisePatient(user, imp.patient_id, 'chart');
    if (imp.withdrawn_at) throw new ApiError(409, 'already_withdrawn', 'This import was already withdrawn.');
    await markImportWithdrawn(trx, importId, { withdrawn_at: now, withdrawn_by: user.id, withdraw_reason: reason });
    const n = await withdrawImportReadings(trx, importId, {
      status_reason: `Import withdrawn: ${reason}`.slice(0, 500),
      status_by: user.id,
      status_at: now,
    });
    await writeAudit(trx, {
      actorId: user.id,
      action: 'import.withdraw',
      entity: 'observation_import',
      entityId: importId,
      before: { withdrawnAt: null },
      after: { reason, readingsWithdrawn: n },
      at: now,
    });
    if (imp.first_at && imp.last_at)
      await refreshMinuteRollup(trx, imp.patient_id, new Date(imp.first_at).getTime(), new Date(imp.last_at).getTime());
    await runObservationHooks(trx, imp.patient_id, now);
    return n;
  });
  return { ...importView((await findImport(importId))!), readingsWithdrawn: marked };
}

export async function listImports(
  user: SessionUser,
  patientId: number,
): Promise<{ imports: ImportView[]; mapping: unknown | null; timeZone: string }> {
  const { stay } = await authorisePatient(user, patientId, 'read');
  const [rows, mapping] = await Promise.all([importsOf(patientId), unitMapping(stay.unit_id)]);
  return { imports: rows.map(importView), mapping, timeZone: stay.time_zone };
}
