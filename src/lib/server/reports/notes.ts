/** Handover notes: each save is a new version naming the one it replaces, audited; nothing is overwritten. */
import { withTransactionRetry } from '~/lib/server/queries/transaction.ts';
import type { HandoverNoteView } from '~/lib/reports/api-types.ts';
import type { HandoverNoteInput } from '~/lib/reports/note-input.ts';
import { ApiError } from '~/lib/server/http.ts';
import { writeAudit } from '~/lib/server/queries/audit.ts';
import { lockPatient } from '~/lib/server/queries/patients.ts';
import { handoverNotesOf, insertHandoverNote } from '~/lib/server/queries/reports.ts';
import type { SessionUser } from '~/lib/server/queries/users.ts';
import { authorisePatient } from '~/lib/server/charting/patients.ts';
import { noteView } from './handover.ts';

export async function listHandoverNotes(user: SessionUser, patientId: number): Promise<HandoverNoteView[]> {
  await authorisePatient(user, patientId, 'read');
  return (await handoverNotesOf(patientId)).map(noteView);
}

export async function writeHandoverNote(
  user: SessionUser,
  patientId: number,
  input: HandoverNoteInput,
  now = new Date(),
): Promise<HandoverNoteView> {
  const { stay } = await authorisePatient(user, patientId, 'chart');
  return withTransactionRetry(async (trx) => {
    await lockPatient(trx, patientId);
    const [latest] = await handoverNotesOf(patientId, trx);
    if ((latest?.version ?? null) !== input.basedOnVersion) {
      throw new ApiError(
        409,
        'stale_note',
        `The note was changed by ${latest?.written_by_name ?? 'someone'} since you opened it; read the newer version first.`,
      );
    }
    const row = {
      patient_id: patientId,
      unit_id: stay.unit_id,
      version: (latest?.version ?? 0) + 1,
      note: input.note,
      supersedes_id: latest?.id ?? null,
      written_by: user.id,
      written_at: now,
    };
    const id = await insertHandoverNote(trx, row);
    await writeAudit(trx, {
      actorId: user.id,
      action: 'handover_note.write',
      entity: 'patient',
      entityId: patientId,
      before: latest ? { id: latest.id, version: latest.version, note: latest.note } : null,
      after: { id, ...row },
      at: now,
    });
    const [saved] = await handoverNotesOf(patientId, trx);
    return noteView(saved!);
  });
}
