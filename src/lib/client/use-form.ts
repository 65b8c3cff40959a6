/**
 * The one shape of a form in an island: busy while one submission runs (a second press does
 * nothing), field errors from the shared zod schema or from the API's `fields`, one alert for a
 * refused or failed save, and one polite status line for what was saved.
 */
import { useCallback, useRef, useState } from 'react';
import type { ZodError } from 'zod';
import { ApiClientError } from '~/lib/client/fetch-json.ts';

export type FieldErrors = Record<string, string>;

/** First message per top-level field (a path under `obs.` is folded onto the field itself). */
export function zodFieldErrors(error: ZodError): FieldErrors {
  const out: FieldErrors = {};
  for (const issue of error.issues) {
    const path = issue.path.filter((p) => p !== 'obs');
    const key = path.length ? String(path[0]) : '_form';
    if (!(key in out)) out[key] = issue.message;
  }
  return out;
}

/** The API's `fields` map ("spo2", "obs.spo2", "takenAt") onto the form's field names. */
export function apiFieldErrors(err: ApiClientError): FieldErrors {
  const out: FieldErrors = {};
  for (const [path, message] of Object.entries(err.fields ?? {})) {
    const key = path.replace(/^obs\./, '').split('.')[0] || '_form';
    if (!(key in out)) out[key] = message;
  }
  return out;
}

export function errorText(err: unknown): string {
  if (err instanceof ApiClientError) return err.message;
  if (err instanceof Error) return err.message;
  return String(err);
}

export interface SubmitOptions {
  /** Put before the reason in the alert, e.g. "Not saved: ". */
  failurePrefix?: string;
  /** Keep the API's field paths as sent ("beds.2.label") instead of folding them onto form fields. */
  rawFieldPaths?: boolean;
  /** Called with the field errors of a refused answer (e.g. to focus the first one). */
  onRefused?: (errors: FieldErrors, err: unknown) => void;
}

export function useForm() {
  const [errors, setErrors] = useState<FieldErrors>({});
  const [alert, setAlert] = useState<string | null>(null);
  const [status, setStatus] = useState('');
  const [busy, setBusy] = useState(false);
  // A ref as well as state: two presses within one render must not send twice.
  const running = useRef(false);

  /** Forget the errors of these fields (the person is typing in them again). */
  const clearErrors = useCallback((...fields: string[]) => {
    setErrors((current) => {
      if (!fields.some((f) => f in current)) return current;
      return Object.fromEntries(Object.entries(current).filter(([k]) => !fields.includes(k)));
    });
  }, []);

  const attempt = useCallback(
    async <T>(work: () => Promise<T>, options: SubmitOptions): Promise<{ ok: true; value: T } | { ok: false }> => {
      if (running.current) return { ok: false };
      running.current = true;
      setBusy(true);
      setAlert(null);
      setStatus('');
      try {
        const value = await work();
        setErrors({});
        return { ok: true, value };
      } catch (err) {
        const fieldErrors = !(err instanceof ApiClientError)
          ? {}
          : options.rawFieldPaths
            ? { ...err.fields }
            : apiFieldErrors(err);
        setErrors(fieldErrors);
        setAlert(`${options.failurePrefix ?? ''}${errorText(err)}`);
        options.onRefused?.(fieldErrors, err);
        return { ok: false };
      } finally {
        running.current = false;
        setBusy(false);
      }
    },
    [],
  );

  /**
   * Runs one submission. Returns what `work` returned, or undefined when it was refused or failed
   * (the alert and field errors then say why) or when another submission was still running.
   */
  const submit = useCallback(
    async <T>(work: () => Promise<T>, options: SubmitOptions = {}): Promise<T | undefined> => {
      const outcome = await attempt(work, options);
      return outcome.ok ? outcome.value : undefined;
    },
    [attempt],
  );

  /**
   * One action of a list screen (add, rename, revoke…): on success the status line says `done`
   * and `after` runs (re-read the list). True when it was done.
   */
  const act = useCallback(
    async (
      done: string,
      work: () => Promise<unknown>,
      options: SubmitOptions & { after?: () => unknown } = {},
    ): Promise<boolean> => {
      const outcome = await attempt(work, options);
      if (!outcome.ok) return false;
      setStatus(done);
      await options.after?.();
      return true;
    },
    [attempt],
  );

  return { errors, setErrors, clearErrors, alert, setAlert, status, setStatus, busy, submit, act };
}
