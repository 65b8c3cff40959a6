/**
 * Obs entry, keyboard first: fields in the order of the paper chart, Enter in any field saves.
 * The browser checks with the same schema as the API (`obsInputSchema`), so the nurse reads the
 * same words in both places; the API's own field errors are mapped back onto the inputs.
 *
 * Time taken is typed as a date and a 24-hour HH:MM in the unit's time zone (never the browser's
 * date-time widget, whose format follows the browser's language), "now" by default, with quick
 * −5 / −15 min buttons; it is sent as an ISO string in UTC.
 *
 * What the server receives: the schema's output, not the raw text. FiO₂ typed as 40 or 0.4 is
 * posted as 0.4; empty fields are left out; takenAt is an ISO string. The server re-parses with
 * the same schema, which leaves these values unchanged.
 *
 * With `correcting`, the same form corrects an earlier obs: prefilled from it, a reason is
 * required, and it posts `{ reason, obs }` to /api/observations/:id/correct.
 */
import { useId, useMemo, useRef, useState, type FormEvent, type KeyboardEvent, type ReactNode, type Ref } from 'react';
import type { ObsView } from '~/lib/charting/api-types.ts';
import { CONSCIOUSNESS } from '~/lib/oxygenation/news2.ts';
import {
  CONSCIOUSNESS_LABELS,
  DEVICE_LABELS,
  FLOW_DEVICES,
  MAX_BACKDATE_HOURS,
  SET_FIO2_DEVICES,
  correctionSchema,
  obsInputSchema,
  obsNotices,
} from '~/lib/charting/obs-input.ts';
import { postJson } from '~/lib/client/fetch-json.ts';
import { OXYGEN_DEVICES, TRACE_QUALITIES, type OxygenDevice } from '~/lib/oxygenation/types.ts';
import { formatClock } from './chart-shared.tsx';
import { useForm, zodFieldErrors, type FieldErrors } from '~/lib/client/use-form.ts';
import { formatDayTime } from '~/lib/time/format.ts';
import { parseWallEntry, toWallEntry } from '~/lib/time/wall-clock.ts';

export interface ObsEntryFormProps {
  patientId: number;
  /** The last current charted obs: device, FiO₂ and flow default from it. */
  lastCharted: ObsView | null;
  /** Unit time zone: the time taken is typed and shown in it. */
  timeZone: string;
  /** Correct this obs instead of charting a new one. */
  correcting?: ObsView | null;
  /** Called after a successful save with the stored obs (refresh the page's data here). */
  onSaved?: (saved: ObsView) => void;
  onCancel?: () => void;
  /** The clock (tests pass a fixed one). */
  now?: () => Date;
}

type FieldName =
  | 'takenDate'
  | 'takenAt'
  | 'spo2'
  | 'heartRate'
  | 'respRate'
  | 'device'
  | 'fio2'
  | 'flowLpm'
  | 'trace'
  | 'perfusionIndex'
  | 'probeSite'
  | 'systolic'
  | 'temperature'
  | 'consciousness'
  | 'note'
  | 'reason';
type Values = Record<FieldName, string>;

const VITALS: FieldName[] = [
  'spo2',
  'heartRate',
  'respRate',
  'perfusionIndex',
  'systolic',
  'temperature',
  'consciousness',
  'note',
];
const NUMERIC: FieldName[] = [
  'spo2',
  'heartRate',
  'respRate',
  'fio2',
  'flowLpm',
  'perfusionIndex',
  'systolic',
  'temperature',
];

const TRACE_LABELS: Record<string, string> = {
  clean: 'Clean',
  weak: 'Weak but steady',
  noisy: 'Noisy (movement, shivering)',
  absent: 'Absent (no reading)',
};

/** Minutes the quick buttons step back from now. */
const QUICK_MINUTES = [5, 15];

const pct = (fraction: number) => String(Math.round(fraction * 1000) / 10);
const str = (v: number | string | null | undefined) => (v === null || v === undefined ? '' : String(v));

function initialValues(
  lastCharted: ObsView | null,
  correcting: ObsView | null | undefined,
  now: Date,
  timeZone: string,
): Values {
  const src = correcting ?? null;
  const deviceFrom = src ?? lastCharted;
  const device = deviceFrom?.device ?? '';
  // An estimated FiO₂ was never charted: do not offer it as if it had been.
  const fio2 = deviceFrom && deviceFrom.fio2 !== null && !deviceFrom.fio2Estimated ? pct(deviceFrom.fio2) : '';
  const flow = deviceFrom && device && FLOW_DEVICES.includes(device as OxygenDevice) ? str(deviceFrom.flowLpm) : '';
  const taken = toWallEntry(src ? new Date(src.takenAt) : now, timeZone);
  return {
    takenDate: taken.date,
    takenAt: taken.time,
    spo2: str(src?.spo2),
    heartRate: str(src?.heartRate),
    respRate: str(src?.respRate),
    device,
    fio2,
    flowLpm: flow,
    trace: src?.trace ?? 'clean',
    perfusionIndex: str(src?.perfusionIndex),
    probeSite: src ? str(src.probeSite) : str(lastCharted?.probeSite),
    systolic: str(src?.systolic),
    temperature: str(src?.temperature),
    consciousness: str(src?.consciousness),
    note: str(src?.note),
    reason: '',
  };
}

export default function ObsEntryForm({
  patientId,
  lastCharted,
  timeZone,
  correcting,
  onSaved,
  onCancel,
  now = () => new Date(),
}: ObsEntryFormProps) {
  const uid = useId();
  const id = (f: string) => `${uid}-${f}`;
  const formRef = useRef<HTMLFormElement>(null);
  const spo2Ref = useRef<HTMLInputElement>(null);
  const [values, setValues] = useState<Values>(() => initialValues(lastCharted, correcting, now(), timeZone));
  const { errors, setErrors, clearErrors, alert: formError, status, setStatus, busy, submit: run } = useForm();

  const device = values.device as OxygenDevice | '';
  const showFlow = device !== '' && FLOW_DEVICES.includes(device);
  const spo2Notices = useMemo(() => {
    const n = Number(values.spo2.trim());
    return values.spo2.trim() !== '' && Number.isFinite(n) ? obsNotices({ spo2: n }) : [];
  }, [values.spo2]);
  const clock = now();

  function set(field: FieldName, value: string) {
    setValues((v) => {
      const next = { ...v, [field]: value };
      if (field === 'device') {
        if (value === 'room_air') next.fio2 = '';
        if (!FLOW_DEVICES.includes(value as OxygenDevice)) next.flowLpm = '';
      }
      return next;
    });
    clearErrors(field);
    setStatus('');
  }

  /** Sets the time taken to now minus `minutes`, in the unit's zone. */
  function setTakenAgo(minutes: number) {
    const w = toWallEntry(now().getTime() - minutes * 60_000, timeZone);
    setValues((v) => ({ ...v, takenDate: w.date, takenAt: w.time }));
    clearErrors('takenAt', 'takenDate');
    setStatus('');
  }
  const typedTaken = parseWallEntry({ date: values.takenDate, time: values.takenAt }, timeZone);

  function rawObs() {
    const clean = (f: FieldName) => {
      const t = values[f].trim();
      return NUMERIC.includes(f) ? t.replace(',', '.') : t;
    };
    return {
      takenAt: 'at' in typedTaken ? typedTaken.at : undefined,
      spo2: clean('spo2'),
      heartRate: clean('heartRate'),
      respRate: clean('respRate'),
      device: values.device === '' ? undefined : values.device,
      fio2: clean('fio2'),
      flowLpm: showFlow ? clean('flowLpm') : '',
      trace: values.trace,
      perfusionIndex: clean('perfusionIndex'),
      probeSite: clean('probeSite'),
      systolic: clean('systolic'),
      temperature: clean('temperature'),
      consciousness: values.consciousness,
      note: clean('note'),
    };
  }

  function focusFirstError(errs: FieldErrors) {
    const order: FieldName[] = [
      'takenDate',
      'takenAt',
      'spo2',
      'heartRate',
      'respRate',
      'device',
      'fio2',
      'flowLpm',
      'trace',
      'perfusionIndex',
      'probeSite',
      'systolic',
      'temperature',
      'consciousness',
      'note',
      'reason',
    ];
    const first = order.find((f) => errs[f]);
    const el = first ? formRef.current?.elements.namedItem(first) : null;
    if (el instanceof HTMLElement) el.focus();
  }

  async function submit(e: FormEvent) {
    e.preventDefault();
    if (busy) return;
    setStatus('');
    const at = now();
    const raw = rawObs();
    if ('error' in typedTaken) {
      const errs = { [/^Date/.test(typedTaken.error) ? 'takenDate' : 'takenAt']: typedTaken.error };
      setErrors(errs);
      focusFirstError(errs);
      return;
    }
    let url: string;
    let body: unknown;
    if (correcting) {
      const parsed = correctionSchema(at).safeParse({ reason: values.reason, obs: raw });
      if (!parsed.success) {
        const errs = zodFieldErrors(parsed.error);
        setErrors(errs);
        focusFirstError(errs);
        return;
      }
      url = `/api/observations/${correcting.id}/correct`;
      body = {
        reason: parsed.data.reason,
        obs: { ...parsed.data.obs, takenAt: parsed.data.obs.takenAt.toISOString() },
      };
    } else {
      const parsed = obsInputSchema(at).safeParse(raw);
      if (!parsed.success) {
        const errs = zodFieldErrors(parsed.error);
        setErrors(errs);
        focusFirstError(errs);
        return;
      }
      url = `/api/patients/${patientId}/observations`;
      body = { ...parsed.data, takenAt: parsed.data.takenAt.toISOString() };
    }
    setErrors({});
    const res = await run(() => postJson<{ observation: ObsView }>(url, body), {
      failurePrefix: 'Not saved: ',
      onRefused: focusFirstError,
    });
    if (res !== undefined) {
      const saved = res?.observation;
      if (!correcting) {
        setValues((v) => {
          const w = toWallEntry(now(), timeZone);
          const next = { ...v, takenDate: w.date, takenAt: w.time, trace: 'clean' };
          for (const f of VITALS) next[f] = '';
          return next;
        });
        spo2Ref.current?.focus();
      }
      const notes = saved?.notices?.length ? ` — ${saved.notices.join('; ')}` : '';
      setStatus(`Saved${saved ? `: obs at ${formatClock(saved.takenAt, timeZone)}` : ''}${notes}`);
      if (saved) onSaved?.(saved);
    }
  }

  function onKeyDown(e: KeyboardEvent<HTMLFormElement>) {
    if (e.key !== 'Enter' || e.shiftKey || e.nativeEvent.isComposing) return;
    const t = e.target as HTMLElement;
    if (t instanceof HTMLInputElement || t instanceof HTMLSelectElement) {
      e.preventDefault();
      formRef.current?.requestSubmit();
    }
  }

  const describedBy = (f: FieldName, extra: string[] = []) => {
    const ids = [...extra];
    if (errors[f]) ids.push(id(`${f}-error`));
    return ids.length ? ids.join(' ') : undefined;
  };
  const fieldProps = (f: FieldName, extra: string[] = []) => ({
    id: id(f),
    name: f,
    value: values[f],
    'aria-invalid': errors[f] ? (true as const) : undefined,
    'aria-describedby': describedBy(f, extra),
    className: `field ${errors[f] ? 'border-coral-600 ring-1 ring-coral-600 dark:border-coral-400' : ''}`,
  });
  const numberInput = (
    f: FieldName,
    opts: { decimal?: boolean; extra?: string[]; inputRef?: Ref<HTMLInputElement> } = {},
  ) => (
    <input
      {...fieldProps(f, opts.extra)}
      ref={opts.inputRef}
      type="text"
      inputMode={opts.decimal ? 'decimal' : 'numeric'}
      autoComplete="off"
      onChange={(e) => set(f, e.target.value)}
    />
  );

  // A render function, not a component: a component defined in here would remount its input on every keystroke.
  const field = (
    f: FieldName,
    label: ReactNode,
    children: ReactNode,
    { hint, wide }: { hint?: ReactNode; wide?: boolean } = {},
  ) => (
    <div className={wide ? 'sm:col-span-2' : ''}>
      <label htmlFor={id(f)} className="mb-0.5 block text-sm font-bold">
        {label}
      </label>
      {children}
      {hint && (
        <p id={id(`${f}-hint`)} className="mt-0.5 text-xs text-ink-500 dark:text-ink-400">
          {hint}
        </p>
      )}
      {errors[f] && (
        <p className="mt-0.5 flex items-start gap-1 text-sm text-coral-700 dark:text-coral-300">
          <span aria-hidden="true">✕</span>
          <span id={id(`${f}-error`)} data-field-error={f}>
            {errors[f]}
          </span>
        </p>
      )}
    </div>
  );

  const earliest = clock.getTime() - MAX_BACKDATE_HOURS * 3_600_000;
  const fio2Required = device !== '' && SET_FIO2_DEVICES.includes(device);
  const title = correcting ? `Correct obs of ${formatClock(correcting.takenAt, timeZone)}` : 'Chart obs';
  const unknownServerFields = Object.keys(errors).filter((k) => !(k in values));

  return (
    <form
      ref={formRef}
      onSubmit={submit}
      onKeyDown={onKeyDown}
      noValidate
      aria-label={title}
      data-testid={correcting ? 'obs-correct-form' : 'obs-entry-form'}
    >
      <h3 className="mb-2 text-lg font-bold">{title}</h3>
      <div className="grid grid-cols-1 gap-x-3 gap-y-2 sm:grid-cols-2">
        <fieldset className="sm:col-span-2" aria-describedby={id('takenAt-hint')} data-testid="taken-at">
          <legend className="mb-0.5 block text-sm font-bold">Time taken</legend>
          <div className="flex flex-wrap items-end gap-2">
            <label className="text-xs">
              Date
              <input
                {...fieldProps('takenDate')}
                type="text"
                inputMode="numeric"
                autoComplete="off"
                placeholder="yyyy-mm-dd"
                size={11}
                aria-label="Date taken"
                onChange={(e) => set('takenDate', e.target.value)}
              />
            </label>
            <label className="text-xs">
              Time (24 h)
              <input
                {...fieldProps('takenAt')}
                type="text"
                inputMode="numeric"
                autoComplete="off"
                placeholder="hh:mm"
                size={6}
                aria-label="Time taken"
                onChange={(e) => set('takenAt', e.target.value)}
              />
            </label>
            <span className="flex gap-1" role="group" aria-label="Quick times">
              <button type="button" className="btn-quiet" onClick={() => setTakenAgo(0)}>
                Now
              </button>
              {QUICK_MINUTES.map((m) => (
                <button
                  key={m}
                  type="button"
                  className="btn-quiet"
                  onClick={() => setTakenAgo(m)}
                  aria-label={`${m} minutes ago`}
                >
                  −{m} min
                </button>
              ))}
            </span>
          </div>
          <p
            id={id('takenAt-hint')}
            className="mt-0.5 text-xs text-ink-500 dark:text-ink-400"
            data-testid="taken-at-reads"
          >
            {'at' in typedTaken ? `Reads ${formatDayTime(typedTaken.at, timeZone)} (unit time). ` : ''}Now, or up to{' '}
            {correcting ? 'a few days' : `${MAX_BACKDATE_HOURS} h`} earlier
            {correcting ? '' : ` (from ${formatDayTime(earliest, timeZone)})`}.
          </p>
          {(['takenDate', 'takenAt'] as const).map(
            (f) =>
              errors[f] && (
                <p key={f} className="mt-0.5 flex items-start gap-1 text-sm text-coral-700 dark:text-coral-300">
                  <span aria-hidden="true">✕</span>
                  <span id={id(`${f}-error`)} data-field-error={f}>
                    {errors[f]}
                  </span>
                </p>
              ),
          )}
        </fieldset>
        {field(
          'spo2',
          'SpO₂ (%)',
          numberInput('spo2', { inputRef: spo2Ref, extra: spo2Notices.length ? [id('spo2-hint')] : [] }),
          {
            hint: spo2Notices.length ? (
              <span className="font-bold text-amberline-700 dark:text-amberline-400" data-testid="spo2-notice">
                <span aria-hidden="true">! </span>
                {spo2Notices.join('; ')}
              </span>
            ) : undefined,
          },
        )}
        {field('heartRate', 'Heart rate (/min)', numberInput('heartRate'))}
        {field('respRate', 'Respiratory rate (/min)', numberInput('respRate'))}
        {field(
          'device',
          'Oxygen device',
          <select {...fieldProps('device')} onChange={(e) => set('device', e.target.value)}>
            <option value="">Choose…</option>
            {OXYGEN_DEVICES.map((d) => (
              <option key={d} value={d}>
                {DEVICE_LABELS[d]}
              </option>
            ))}
          </select>,
        )}
        {field('fio2', 'FiO₂', numberInput('fio2', { decimal: true, extra: [id('fio2-hint')] }), {
          hint: `21–100 % or 0.21–1.0${fio2Required ? ' · as set on the machine' : ''}`,
        })}
        {showFlow && field('flowLpm', 'Flow (L/min)', numberInput('flowLpm', { decimal: true }))}
        {field(
          'trace',
          'Trace quality',
          <select {...fieldProps('trace')} onChange={(e) => set('trace', e.target.value)}>
            {TRACE_QUALITIES.map((t) => (
              <option key={t} value={t}>
                {TRACE_LABELS[t]}
              </option>
            ))}
          </select>,
        )}
        {field('perfusionIndex', 'Perfusion index (%)', numberInput('perfusionIndex', { decimal: true }))}
        {field(
          'probeSite',
          'Probe site',
          <input
            {...fieldProps('probeSite')}
            type="text"
            autoComplete="off"
            placeholder="e.g. left index finger"
            onChange={(e) => set('probeSite', e.target.value)}
          />,
        )}
        {field('systolic', 'Systolic BP (mmHg)', numberInput('systolic'))}
        {field('temperature', 'Temperature (°C)', numberInput('temperature', { decimal: true }))}
        {field(
          'consciousness',
          'Consciousness',
          <select {...fieldProps('consciousness')} onChange={(e) => set('consciousness', e.target.value)}>
            <option value="">Not assessed</option>
            {CONSCIOUSNESS.map((c) => (
              <option key={c} value={c}>
                {CONSCIOUSNESS_LABELS[c]}
              </option>
            ))}
          </select>,
        )}
        {field(
          'note',
          'Note',
          <input
            {...fieldProps('note')}
            type="text"
            autoComplete="off"
            onChange={(e) => set('note', e.target.value)}
          />,
          { wide: true },
        )}
        {correcting &&
          field(
            'reason',
            'Reason for the correction',
            <input
              {...fieldProps('reason')}
              type="text"
              autoComplete="off"
              onChange={(e) => set('reason', e.target.value)}
            />,
            { wide: true },
          )}
      </div>
      {formError && (
        <div
          role="alert"
          className="mt-3 rounded-md border border-coral-300 bg-coral-50 p-2 text-sm text-coral-800 dark:border-coral-700 dark:bg-coral-900/30 dark:text-coral-200"
        >
          <p>{formError}</p>
          {unknownServerFields.length > 0 && (
            <ul className="list-disc pl-5">
              {unknownServerFields.map((k) => (
                <li key={k}>{errors[k]}</li>
              ))}
            </ul>
          )}
        </div>
      )}
      <div className="mt-3 flex flex-wrap items-center gap-3">
        <button type="submit" className="btn-primary" disabled={busy}>
          {busy ? 'Saving…' : correcting ? 'Save correction' : 'Save obs'}
        </button>
        {onCancel && (
          <button type="button" className="btn-quiet" onClick={onCancel}>
            Cancel
          </button>
        )}
        <span className="text-xs text-ink-500 dark:text-ink-400">Enter saves</span>
        <p role="status" aria-live="polite" className="text-sm font-bold text-glass-700 dark:text-glass-300">
          {status}
        </p>
      </div>
    </form>
  );
}
