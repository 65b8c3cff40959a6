/**
 * Marking a charted entry (an obs or a blood gas) entered in error: one reason, required. The entry
 * is never removed; the server keeps it, struck through, with the name and the reason.
 */
import { useId, useState, type FormEvent } from 'react';
import { enteredInErrorSchema } from '~/lib/charting/obs-input.ts';
import { postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';
import FormButtons from '~/components/FormButtons.tsx';

interface Props {
  /** The endpoint that marks it, e.g. `/api/observations/12/entered-in-error`. */
  url: string;
  /** The form's accessible name, e.g. "Mark obs of 2 Dec 14:05 entered in error". */
  label: string;
  /** What stays, in words: "The entry" or "The gas". */
  what: string;
  onDone: () => void;
  onCancel: () => void;
}

export default function EnteredInErrorForm({ url, label, what, onDone, onCancel }: Props) {
  const uid = useId();
  const [reason, setReason] = useState('');
  const { errors, setErrors, alert, busy, submit: run } = useForm();
  const fieldError = errors.reason;

  async function submit(e: FormEvent) {
    e.preventDefault();
    if (busy) return;
    const parsed = enteredInErrorSchema.safeParse({ reason });
    if (!parsed.success) {
      setErrors({ reason: parsed.error.issues[0]?.message ?? 'Give the reason this entry is in error' });
      return;
    }
    setErrors({});
    const marked = await run(() => postJson(url, parsed.data), { failurePrefix: 'Not saved: ' });
    if (marked !== undefined) onDone();
  }

  return (
    <form onSubmit={submit} noValidate aria-label={label} className="max-w-xl">
      <p className="mb-2 text-sm">{what} stays in the record, struck through, with your name and reason.</p>
      <label htmlFor={`${uid}-reason`} className="mb-0.5 block text-sm font-bold">
        Reason this entry is in error
      </label>
      <input
        id={`${uid}-reason`}
        className="field"
        value={reason}
        autoComplete="off"
        // biome-ignore lint/a11y/noAutofocus: the form opens on the person's own click, and its one field is what they came to type
        autoFocus
        aria-invalid={fieldError ? true : undefined}
        aria-describedby={fieldError ? `${uid}-reason-error` : undefined}
        onChange={(e) => setReason(e.target.value)}
      />
      {fieldError && (
        <p id={`${uid}-reason-error`} className="mt-0.5 text-sm text-coral-700 dark:text-coral-300">
          {fieldError}
        </p>
      )}
      {alert && (
        <p role="alert" className="mt-1 text-sm text-coral-800 dark:text-coral-200">
          {alert}
        </p>
      )}
      <FormButtons action="Mark entered in error" onCancel={onCancel} busy={busy} className="mt-2 flex gap-2" />
    </form>
  );
}
