/**
 * Blood gases on the bed chart: the entry form (for those who chart), the table of every gas
 * (corrected and entered-in-error rows stay, struck through) with the measured P/F and its Berlin
 * band, the A–a gradient, O₂ content and the SpO₂–SaO₂ pair, and occult hypoxaemia flagged in words
 * and shape. Pressures show in the unit's gas unit. The browser checks with the API's own schema.
 */
import { useEffect, useId, useState, type FormEvent, type ReactNode } from 'react';
import type { BloodGasCreated, BloodGasList, BloodGasView, NearestSpo2 } from '~/lib/bloodgas/api-types.ts';
import { bloodGasCorrectionSchema, bloodGasInputSchema, SAMPLE_TYPE_LABELS } from '~/lib/bloodgas/bloodgas-input.ts';
import { BERLIN_WORDS, formatGas, fromMmHg, SAMPLE_TYPES, type GasUnit } from '~/lib/bloodgas/compute.ts';
import { formatInTimeZone } from 'date-fns-tz';
import { clockIn, sampleInstant, unitDayOptions } from '~/lib/bloodgas/sample-time.ts';
import { fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { usePolled } from '~/lib/client/use-polled.ts';
import { formatDayTime } from '~/lib/time/format.ts';
import { POLL_MS, chartKeys, fmtFio2, useRefreshChart } from './chart-shared.tsx';
import EnteredInErrorForm from './EnteredInErrorForm.tsx';
import { errorText, useForm, zodFieldErrors, type FieldErrors } from '~/lib/client/use-form.ts';

export const gasKey = (patientId: number) => `${chartKeys(patientId).patient}/blood-gases`;

export interface BloodGasPanelProps {
  patientId: number;
  timeZone: string;
  canChart: boolean;
  now?: () => Date;
}

export default function BloodGasPanel({ patientId, timeZone, canChart, now = () => new Date() }: BloodGasPanelProps) {
  const { data, error } = usePolled<BloodGasList>(gasKey(patientId), POLL_MS);
  const [message, setMessage] = useState('');
  return (
    <section aria-labelledby="gas-title" data-testid="blood-gases">
      <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="gas-title" className="text-lg font-bold">
          Blood gases
        </h2>
        <p className="text-sm text-ink-500 dark:text-ink-400">
          The measured SaO₂ beside the oximeter’s SpO₂ · pressures in {data?.gasUnit ?? '…'}
        </p>
      </div>
      {error && (
        <p role="alert" className="text-sm text-coral-800 dark:text-coral-200">
          Could not load blood gases: {errorText(error)}
        </p>
      )}
      <div className="grid gap-4 xl:grid-cols-3">
        {canChart && data && (
          <div className="xl:col-span-1">
            <GasForm
              patientId={patientId}
              timeZone={timeZone}
              gasUnit={data.gasUnit}
              now={now}
              onSaved={(words) => setMessage(words)}
            />
          </div>
        )}
        <div className={`min-w-0 ${canChart ? 'xl:col-span-2' : 'xl:col-span-3'}`}>
          <p
            role="status"
            aria-live="polite"
            className="mb-1 text-sm font-bold text-glass-700 dark:text-glass-300"
            data-testid="gas-status"
          >
            {message}
          </p>
          {data ? (
            <GasTable list={data} timeZone={timeZone} canChart={canChart} patientId={patientId} />
          ) : (
            <p>Loading blood gases…</p>
          )}
        </div>
      </div>
    </section>
  );
}

/** The patient's running SpO₂ bias, shown beside the band: a prompt for the intensivist, never an automatic change. */
export function GasBias({ patientId }: { patientId: number }) {
  const { data } = usePolled<BloodGasList>(gasKey(patientId), POLL_MS);
  if (!data?.bias) return null;
  const m = data.bias.median;
  const over = m > 0;
  return (
    <p
      className={`text-sm ${over && m >= 4 ? 'font-bold text-coral-800 dark:text-coral-200' : 'text-ink-600 dark:text-ink-300'}`}
      data-testid="gas-bias"
    >
      Oximeter bias for this patient: SpO₂ reads{' '}
      {m > 0 ? `${fmt(m)} points above` : m < 0 ? `${fmt(-m)} points below` : 'the same as'} the measured SaO₂ (median
      of {data.bias.pairs} pair{data.bias.pairs === 1 ? '' : 's'}
      {data.occultCount ? `; ${data.occultCount} with occult hypoxaemia` : ''})
      {over && m >= 2 && (
        <>
          {' '}
          — a band set on SpO₂ may need to be higher for this patient: a question for the intensivist, never an
          automatic change.
        </>
      )}
    </p>
  );
}
const fmt = (v: number) => (Number.isInteger(v) ? String(v) : v.toFixed(1));

function OccultMark({ className = '' }: { className?: string }) {
  return (
    <span
      className={`inline-flex items-center gap-1 font-bold text-coral-800 dark:text-coral-200 ${className}`}
      data-testid="gas-occult"
    >
      <svg width="14" height="14" viewBox="0 0 24 24" aria-hidden="true">
        <path d="M12 3l10 18H2z" fill="none" stroke="currentColor" strokeWidth="3" strokeLinejoin="round" />
      </svg>
      Occult hypoxaemia
    </span>
  );
}

function GasTable({
  list,
  timeZone,
  canChart,
  patientId,
}: {
  list: BloodGasList;
  timeZone: string;
  canChart: boolean;
  patientId: number;
}) {
  const [marking, setMarking] = useState<{ id: number; kind: 'error' | 'correct' } | null>(null);
  const unit = list.gasUnit;
  if (list.bloodGases.length === 0) return <p className="text-sm text-ink-500">No blood gases charted.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="stack-table w-full min-w-[56rem] border-collapse text-sm" data-testid="gas-table">
        <caption className="sr-only">Blood gases, newest first</caption>
        <thead>
          <tr className="border-b border-ink-200 text-left text-xs uppercase tracking-wide text-ink-500 dark:border-ink-700 dark:text-ink-400">
            <th scope="col" className="py-1 pr-2">
              Sampled
            </th>
            <th scope="col" className="pr-2">
              Type
            </th>
            <th scope="col" className="pr-2">
              pH
            </th>
            <th scope="col" className="pr-2">
              PaO₂
            </th>
            <th scope="col" className="pr-2">
              PaCO₂
            </th>
            <th scope="col" className="pr-2">
              SaO₂ / SpO₂
            </th>
            <th scope="col" className="pr-2">
              P/F
            </th>
            <th scope="col" className="pr-2">
              A–a
            </th>
            <th scope="col" className="pr-2">
              CaO₂
            </th>
            <th scope="col" className="pr-2">
              HCO₃⁻ · BE · lactate · Hb
            </th>
            <th scope="col" className="pr-2">
              FiO₂
            </th>
            <th scope="col">Who · status</th>
          </tr>
        </thead>
        <tbody>
          {list.bloodGases.map((g) => (
            <GasRow
              key={g.id}
              g={g}
              unit={unit}
              timeZone={timeZone}
              canAct={canChart && g.status === 'current'}
              marking={marking?.id === g.id ? marking.kind : null}
              onMark={(kind) => setMarking(kind ? { id: g.id, kind } : null)}
              patientId={patientId}
            />
          ))}
        </tbody>
      </table>
      <p className="mt-1 text-xs text-ink-500 dark:text-ink-400">
        Berlin P/F bands (JAMA 2012) apply with PEEP or CPAP ≥ 5 cmH₂O; they are shown, not a diagnosis. A–a from the
        alveolar gas equation at {list.barometricMmHg} mmHg.
      </p>
    </div>
  );
}

function GasRow({
  g,
  unit,
  timeZone,
  canAct,
  marking,
  onMark,
  patientId,
}: {
  g: BloodGasView;
  unit: GasUnit;
  timeZone: string;
  canAct: boolean;
  marking: 'error' | 'correct' | null;
  onMark: (kind: 'error' | 'correct' | null) => void;
  patientId: number;
}) {
  const struck = g.status !== 'current';
  const tone = struck ? 'text-ink-500 line-through decoration-2 dark:text-ink-400' : '';
  const cell = (c: ReactNode) => (struck ? <s>{c}</s> : c);
  const occult = g.flags.includes('occult_hypoxaemia');
  const d = g.derived;
  const refresh = useRefreshChart(patientId);
  return (
    <>
      <tr
        data-gas-id={g.id}
        data-status={g.status}
        data-occult={occult || undefined}
        className={`border-b border-ink-100 align-top dark:border-ink-800 ${occult && !struck ? 'bg-coral-50 dark:bg-coral-900/25' : ''}`}
      >
        <td data-label="Sampled" className={`py-1.5 pr-2 whitespace-nowrap ${tone}`}>
          {cell(formatDayTime(g.sampledAt, timeZone))}
        </td>
        <td data-label="Type" className={`pr-2 ${tone}`}>
          {cell(SAMPLE_TYPE_LABELS[g.sampleType])}
        </td>
        <td data-label="pH" className={`pr-2 ${tone}`}>
          {cell(g.ph.toFixed(2))}
        </td>
        <td data-label="PaO₂" className={`pr-2 whitespace-nowrap ${tone}`}>
          {cell(formatGas(g.pao2MmHg, unit))}
        </td>
        <td data-label="PaCO₂" className={`pr-2 whitespace-nowrap ${tone}`}>
          {cell(formatGas(g.paco2MmHg, unit))}
        </td>
        <td data-label="SaO₂ / SpO₂" className={`pr-2 ${tone}`}>
          {cell(
            <span className="inline-flex flex-col">
              <span className="font-bold">SaO₂ {fmt(g.sao2)} %</span>
              <span>
                {g.spo2AtSample === null
                  ? 'no SpO₂ paired'
                  : `SpO₂ ${g.spo2AtSample} %${g.spo2Source === 'nearest_reading' ? ' (nearest reading)' : ''}`}
              </span>
              {d.spo2Difference !== null && (
                <span className="text-xs">
                  gap {d.spo2Difference > 0 ? '+' : ''}
                  {fmt(d.spo2Difference)} points
                </span>
              )}
              {occult && !struck && <OccultMark className="text-xs" />}
            </span>,
          )}
        </td>
        <td data-label="P/F" className={`pr-2 ${tone}`}>
          {cell(
            d.pf === null ? (
              '—'
            ) : (
              <span className="inline-flex flex-col">
                <span className="font-bold">{d.pf}</span>
                {d.berlinBand && <span className="text-xs">{BERLIN_WORDS[d.berlinBand]}</span>}
              </span>
            ),
          )}
        </td>
        <td data-label="A–a" className={`pr-2 whitespace-nowrap ${tone}`}>
          {cell(d.aaGradient === null ? '—' : formatGas(d.aaGradient, unit))}
        </td>
        <td data-label="CaO₂" className={`pr-2 whitespace-nowrap ${tone}`}>
          {cell(d.oxygenContent === null ? '—' : `${d.oxygenContent.toFixed(1)} mL/dL`)}
        </td>
        <td data-label="HCO₃⁻ · BE · lactate · Hb" className={`pr-2 ${tone}`}>
          {cell(
            [
              g.hco3 === null ? '—' : `${g.hco3}`,
              g.baseExcess === null ? '—' : `${g.baseExcess > 0 ? '+' : ''}${g.baseExcess}`,
              g.lactate === null ? '—' : `${g.lactate}`,
              g.hbGdl === null ? '—' : `${g.hbGdl} g/dL`,
            ].join(' · '),
          )}
        </td>
        <td data-label="FiO₂" className={`pr-2 ${tone}`}>
          {cell(fmtFio2(g.fio2))}
        </td>
        <td data-label="Who · status" className="min-w-[12rem] text-xs">
          <p>{g.recordedBy ?? '—'}</p>
          {g.status === 'superseded' && (
            <p>
              <strong>Corrected</strong>
              {g.statusBy ? ` by ${g.statusBy}` : ''}
              {g.statusReason ? ` — why: “${g.statusReason}”` : ''}
            </p>
          )}
          {g.status === 'entered_in_error' && (
            <p>
              <strong>Entered in error</strong>
              {g.statusBy ? ` by ${g.statusBy}` : ''}
              {g.statusReason ? ` — why: “${g.statusReason}”` : ''}
            </p>
          )}
          {g.replacesId !== null && <p>corrects an earlier gas</p>}
          {g.note && <p className="italic">Note: {g.note}</p>}
          {canAct && (
            <div className="mt-1 flex flex-wrap gap-1">
              <button
                type="button"
                className="btn-quiet px-2 py-0.5 text-xs"
                aria-expanded={marking === 'correct'}
                onClick={() => onMark(marking === 'correct' ? null : 'correct')}
              >
                Correct<span className="sr-only"> gas of {formatDayTime(g.sampledAt, timeZone)}</span>
              </button>
              <button
                type="button"
                className="btn-quiet px-2 py-0.5 text-xs"
                aria-expanded={marking === 'error'}
                onClick={() => onMark(marking === 'error' ? null : 'error')}
              >
                Entered in error<span className="sr-only">: gas of {formatDayTime(g.sampledAt, timeZone)}</span>
              </button>
            </div>
          )}
        </td>
      </tr>
      {g.sampleType !== 'arterial' && !struck && (
        <tr className="border-b border-ink-100 dark:border-ink-800">
          <td colSpan={12} className="pb-1 text-xs text-ink-500 dark:text-ink-400">
            {d.notes.join(' · ')}
          </td>
        </tr>
      )}
      {marking === 'error' && (
        <tr>
          <td colSpan={12} className="bg-ink-50 p-3 dark:bg-ink-950/40">
            <EnteredInErrorForm
              url={`/api/blood-gases/${g.id}/entered-in-error`}
              label="Mark blood gas entered in error"
              what="The gas"
              onDone={() => {
                onMark(null);
                void refresh();
              }}
              onCancel={() => onMark(null)}
            />
          </td>
        </tr>
      )}
      {marking === 'correct' && (
        <tr>
          <td colSpan={12} className="bg-ink-50 p-3 dark:bg-ink-950/40">
            <div className="max-w-2xl">
              <GasForm
                patientId={patientId}
                timeZone={timeZone}
                gasUnit={g.enteredUnit}
                correcting={g}
                onSaved={() => onMark(null)}
                onCancel={() => onMark(null)}
              />
            </div>
          </td>
        </tr>
      )}
    </>
  );
}

type GasFieldName =
  | 'day'
  | 'clock'
  | 'sampleType'
  | 'gasUnit'
  | 'ph'
  | 'pao2'
  | 'paco2'
  | 'sao2'
  | 'hco3'
  | 'baseExcess'
  | 'lactate'
  | 'hb'
  | 'fio2'
  | 'spo2AtSample'
  | 'note'
  | 'reason';

interface GasFormProps {
  patientId: number;
  timeZone: string;
  gasUnit: GasUnit;
  now?: () => Date;
  onSaved: (words: string) => void;
  /** Correct this gas instead of charting a new one: prefilled, a reason required; the original is kept. */
  correcting?: BloodGasView;
  onCancel?: () => void;
}

const str = (v: number | null | undefined, dp?: number) =>
  v === null || v === undefined ? '' : dp === undefined ? String(v) : v.toFixed(dp);

function GasForm({
  patientId,
  timeZone,
  gasUnit,
  now = () => new Date(),
  onSaved,
  correcting,
  onCancel,
}: GasFormProps) {
  const uid = useId();
  const id = (f: string) => `${uid}-${f}`;
  const refresh = useRefreshChart(patientId);
  const days = unitDayOptions(now(), timeZone);
  const blank = (): Record<GasFieldName, string> => ({
    day: days[0]!.value,
    clock: clockIn(now(), timeZone),
    sampleType: 'arterial',
    gasUnit,
    ph: '',
    pao2: '',
    paco2: '',
    sao2: '',
    hco3: '',
    baseExcess: '',
    lactate: '',
    hb: '',
    fio2: '',
    spo2AtSample: '',
    note: '',
    reason: '',
  });
  const fromGas = (g: BloodGasView): Record<GasFieldName, string> => ({
    day: formatInTimeZone(new Date(g.sampledAt), timeZone, 'yyyy-MM-dd'),
    clock: clockIn(new Date(g.sampledAt), timeZone),
    sampleType: g.sampleType,
    gasUnit: g.enteredUnit,
    ph: str(g.ph),
    pao2: str(fromMmHg(g.pao2MmHg, g.enteredUnit), g.enteredUnit === 'kPa' ? 1 : 0),
    paco2: str(fromMmHg(g.paco2MmHg, g.enteredUnit), g.enteredUnit === 'kPa' ? 1 : 0),
    sao2: str(g.sao2),
    hco3: str(g.hco3),
    baseExcess: str(g.baseExcess),
    lactate: str(g.lactate),
    hb: str(g.hbGdl),
    fio2: str(Math.round(g.fio2 * 1000) / 10),
    spo2AtSample: str(g.spo2AtSample),
    note: g.note ?? '',
    reason: '',
  });
  if (correcting) {
    const day = formatInTimeZone(new Date(correcting.sampledAt), timeZone, 'yyyy-MM-dd');
    if (!days.some((d) => d.value === day))
      days.push({ value: day, label: formatInTimeZone(new Date(correcting.sampledAt), timeZone, 'd MMM') });
  }
  const [v, setV] = useState(() => (correcting ? fromGas(correcting) : blank()));
  const { errors, setErrors, clearErrors, alert, busy, submit: run } = useForm();
  const [spo2Touched, setSpo2Touched] = useState(Boolean(correcting));
  const [nearestWords, setNearestWords] = useState<string>('');

  // Prefill the pair's SpO₂ from the nearest trusted reading within 2 min of the sample time (editable).
  useEffect(() => {
    if (spo2Touched) return;
    const at = sampleInstant(v.day, v.clock, timeZone);
    if (!('at' in at)) return;
    let stale = false;
    const timer = setTimeout(async () => {
      try {
        const r = await fetchJson<{ nearest: NearestSpo2 | null }>(
          `${chartKeys(patientId).patient}/blood-gases/nearest-spo2?at=${encodeURIComponent(at.at.toISOString())}`,
        );
        if (stale) return;
        setV((p) => ({ ...p, spo2AtSample: r.nearest ? String(r.nearest.spo2) : '' }));
        setNearestWords(
          r.nearest
            ? `From the trusted reading of ${formatDayTime(r.nearest.at, timeZone)} — change it if the monitor showed otherwise`
            : 'No trusted reading within 2 min of the sample: type what the monitor showed',
        );
      } catch {
        /* leave it for the nurse to type */
      }
    }, 250);
    return () => {
      stale = true;
      clearTimeout(timer);
    };
  }, [v.day, v.clock, spo2Touched, patientId, timeZone]);

  const set = (f: GasFieldName, value: string) => {
    if (f === 'spo2AtSample') {
      setSpo2Touched(true);
      setNearestWords('');
    }
    setV((p) => ({ ...p, [f]: value }));
    clearErrors(f);
  };

  async function submit(e: FormEvent) {
    e.preventDefault();
    if (busy) return;
    const at = sampleInstant(v.day, v.clock, timeZone);
    if (!('at' in at)) {
      setErrors({ clock: at.error });
      return;
    }
    const clean = (f: GasFieldName) => v[f].trim().replace(',', '.');
    const raw = {
      sampledAt: at.at,
      sampleType: v.sampleType,
      gasUnit: v.gasUnit,
      ph: clean('ph'),
      pao2: clean('pao2'),
      paco2: clean('paco2'),
      sao2: clean('sao2'),
      hco3: clean('hco3'),
      baseExcess: clean('baseExcess'),
      lactate: clean('lactate'),
      hb: clean('hb'),
      fio2: clean('fio2'),
      spo2AtSample: clean('spo2AtSample'),
      note: v.note.trim(),
    };
    let url = `${chartKeys(patientId).patient}/blood-gases`;
    let body: unknown;
    if (correcting) {
      const parsed = bloodGasCorrectionSchema(now()).safeParse({ reason: v.reason, gas: raw });
      if (!parsed.success) {
        setErrors(gasFieldErrors(zodFieldErrors(parsed.error)));
        return;
      }
      url = `/api/blood-gases/${correcting.id}/correct`;
      body = {
        reason: parsed.data.reason,
        gas: { ...parsed.data.gas, sampledAt: parsed.data.gas.sampledAt.toISOString() },
      };
    } else {
      const parsed = bloodGasInputSchema(now()).safeParse(raw);
      if (!parsed.success) {
        setErrors(mapTime(zodFieldErrors(parsed.error)));
        return;
      }
      body = { ...parsed.data, sampledAt: parsed.data.sampledAt.toISOString() };
    }
    setErrors({});
    const res = await run(() => postJson<BloodGasCreated>(url, body), {
      failurePrefix: 'Not saved: ',
      onRefused: (fields) => setErrors(gasFieldErrors(fields)),
    });
    if (res === undefined) return;
    const occult = res.flags.includes('occult_hypoxaemia');
    onSaved(
      `${correcting ? 'Correction saved; the original stays, struck through' : 'Saved'}: gas of ${formatDayTime(res.bloodGas.sampledAt, timeZone)}${occult ? ' — occult hypoxaemia: SaO₂ under 88 % while SpO₂ read 92 % or more; a bedside task is raised' : ''}`,
    );
    setV(blank());
    setSpo2Touched(false);
    void refresh();
  }

  const err = (f: string) =>
    errors[f] ? (
      <p id={id(`${f}-e`)} className="mt-0.5 text-sm text-coral-700 dark:text-coral-300" data-field-error={f}>
        {errors[f]}
      </p>
    ) : null;
  const input = (
    f: GasFieldName,
    label: string,
    opts: { hint?: string; mode?: 'decimal' | 'numeric' | 'text' } = {},
  ) => (
    <div>
      <label htmlFor={id(f)} className="block text-sm font-bold">
        {label}
      </label>
      <input
        id={id(f)}
        name={f}
        className="field"
        type="text"
        inputMode={opts.mode ?? 'decimal'}
        autoComplete="off"
        value={v[f]}
        onChange={(e) => set(f, e.target.value)}
        aria-invalid={errors[f] ? true : undefined}
        aria-describedby={
          [opts.hint ? id(`${f}-h`) : '', errors[f] ? id(`${f}-e`) : ''].filter(Boolean).join(' ') || undefined
        }
      />
      {opts.hint && (
        <p id={id(`${f}-h`)} className="text-xs text-ink-500 dark:text-ink-400">
          {opts.hint}
        </p>
      )}
      {err(f)}
    </div>
  );
  const u = v.gasUnit as GasUnit;

  return (
    <form
      onSubmit={submit}
      noValidate
      aria-label={correcting ? 'Correct a blood gas' : 'Chart a blood gas'}
      data-testid={correcting ? 'gas-correct-form' : 'gas-form'}
      className="rounded-md border border-ink-200 p-3 dark:border-ink-700"
    >
      <h3 className="mb-2 text-base font-bold">
        {correcting ? `Correct the gas of ${formatDayTime(correcting.sampledAt, timeZone)}` : 'Chart a blood gas'}
      </h3>
      <div className="grid grid-cols-2 gap-x-3 gap-y-2">
        <div>
          <label htmlFor={id('day')} className="block text-sm font-bold">
            Sample day
          </label>
          <select
            id={id('day')}
            name="day"
            className="field"
            value={v.day}
            onChange={(e) => set('day', e.target.value)}
          >
            {days.map((d) => (
              <option key={d.value} value={d.value}>
                {d.label}
              </option>
            ))}
          </select>
        </div>
        {input('clock', 'Sample time (24 h)', { mode: 'numeric', hint: 'unit time, as on the printout' })}
        <div>
          <label htmlFor={id('sampleType')} className="block text-sm font-bold">
            Sample
          </label>
          <select
            id={id('sampleType')}
            name="sampleType"
            className="field"
            value={v.sampleType}
            onChange={(e) => set('sampleType', e.target.value)}
          >
            {SAMPLE_TYPES.map((t) => (
              <option key={t} value={t}>
                {SAMPLE_TYPE_LABELS[t]}
              </option>
            ))}
          </select>
          {err('sampleType')}
        </div>
        <div>
          <label htmlFor={id('gasUnit')} className="block text-sm font-bold">
            Pressures in
          </label>
          <select
            id={id('gasUnit')}
            name="gasUnit"
            className="field"
            value={v.gasUnit}
            onChange={(e) => set('gasUnit', e.target.value)}
          >
            <option value="kPa">kPa</option>
            <option value="mmHg">mmHg</option>
          </select>
        </div>
        {input('ph', 'pH')}
        {input('sao2', 'SaO₂ (%) co-oximetry')}
        {input('pao2', `PaO₂ (${u})`)}
        {input('paco2', `PaCO₂ (${u})`)}
        {input('fio2', 'FiO₂ at sampling', { hint: '21–100 % or 0.21–1.0' })}
        {input('spo2AtSample', 'SpO₂ on the monitor (%)', {
          mode: 'numeric',
          hint: nearestWords || 'what the monitor showed at the sample',
        })}
        {input('hco3', 'HCO₃⁻ (mmol/L)')}
        {input('baseExcess', 'Base excess (mmol/L)')}
        {input('lactate', 'Lactate (mmol/L)')}
        {input('hb', 'Hb (g/dL or g/L)')}
        <div className="col-span-2">
          <label htmlFor={id('note')} className="block text-sm font-bold">
            Note
          </label>
          <input
            id={id('note')}
            name="note"
            className="field"
            type="text"
            autoComplete="off"
            value={v.note}
            onChange={(e) => set('note', e.target.value)}
          />
        </div>
        {correcting && (
          <div className="col-span-2">{input('reason', 'Reason for the correction', { mode: 'text' })}</div>
        )}
      </div>
      {alert && (
        <p
          role="alert"
          className="mt-2 rounded-md border border-coral-300 bg-coral-50 p-2 text-sm text-coral-800 dark:border-coral-700 dark:bg-coral-900/30 dark:text-coral-200"
        >
          {alert}
        </p>
      )}
      <div className="mt-3 flex gap-2">
        <button type="submit" className="btn-primary" disabled={busy}>
          {busy ? 'Saving…' : correcting ? 'Save correction' : 'Save blood gas'}
        </button>
        {onCancel && (
          <button type="button" className="btn-quiet" onClick={onCancel}>
            Cancel
          </button>
        )}
      </div>
    </form>
  );
}

/** A correction's fields sit under `gas.`; the form's fields do not. */
function gasFieldErrors(e: FieldErrors): FieldErrors {
  return mapTime(Object.fromEntries(Object.entries(e).map(([k, m]) => [k.replace(/^gas\./, ''), m])));
}

/** The schema names the instant `sampledAt`; the form shows it as the clock field. */
function mapTime(e: FieldErrors): FieldErrors {
  const { sampledAt, ...rest } = e;
  return sampledAt ? { ...rest, clock: sampledAt } : rest;
}
