import { useState } from 'react';
import type { HandoverNoteView } from '~/lib/reports/api-types.ts';
import { handoverNoteInput } from '~/lib/reports/note-input.ts';
import { ApiClientError, postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';
import { formatDayTime } from '~/lib/time/format.ts';

interface Props {
  patientId: number;
  bedLabel: string;
  timeZone: string;
  initial: HandoverNoteView | null;
  canWrite: boolean;
}

/**
 * The handover note of one patient: the newest version to read (printed), and on screen a form that
 * saves a new version (the previous stays in the record). The form never prints.
 */
export default function HandoverNote({ patientId, bedLabel, timeZone, initial, canWrite }: Props) {
  const [note, setNote] = useState<HandoverNoteView | null>(initial);
  const [draft, setDraft] = useState(initial?.note ?? '');
  const { alert: problem, setAlert: setProblem, busy: saving, submit: run } = useForm();
  const [saved, setSaved] = useState(false);

  async function save(e: React.FormEvent) {
    e.preventDefault();
    setProblem(null);
    setSaved(false);
    const parsed = handoverNoteInput.safeParse({ note: draft, basedOnVersion: note?.version ?? null });
    if (!parsed.success) {
      setProblem(parsed.error.issues[0]?.message ?? 'Check the note');
      return;
    }
    const res = await run(
      () => postJson<{ note: HandoverNoteView }>(`/api/patients/${patientId}/handover-notes`, parsed.data),
      {
        onRefused: (_fields, err) => {
          if (!(err instanceof ApiClientError)) setProblem('Could not save the note; it is still in the box.');
        },
      },
    );
    if (res === undefined) return;
    setNote(res.note);
    setDraft(res.note.note);
    setSaved(true);
  }

  return (
    <div data-testid={`handover-note-${bedLabel}`}>
      <div className="text-sm">
        <span className="font-bold">Handover note</span>{' '}
        {note ? (
          <span className="text-ink-600 dark:text-ink-300">
            (version {note.version}, {note.writtenBy}, {formatDayTime(note.writtenAt, timeZone)})
          </span>
        ) : (
          <span className="text-ink-600 dark:text-ink-300">none yet</span>
        )}
        {note && (
          <p className="whitespace-pre-wrap" data-testid="handover-note-text">
            {note.note}
          </p>
        )}
      </div>
      {canWrite && (
        <form onSubmit={save} className="mt-1 print:hidden">
          <label className="block text-sm" htmlFor={`note-${patientId}`}>
            Write the note for the next shift (saved as a new version)
          </label>
          <textarea
            id={`note-${patientId}`}
            className="field mt-1 h-20"
            value={draft}
            maxLength={4000}
            onChange={(e) => setDraft(e.target.value)}
          />
          <div className="mt-1 flex items-center gap-3">
            <button type="submit" className="btn-quiet text-sm" disabled={saving}>
              {saving ? 'Saving…' : 'Save note'}
            </button>
            {saved && (
              <span role="status" className="text-sm">
                Saved
              </span>
            )}
            {problem && (
              <span role="alert" className="text-sm text-coral-700 dark:text-coral-300">
                {problem}
              </span>
            )}
          </div>
        </form>
      )}
    </div>
  );
}
