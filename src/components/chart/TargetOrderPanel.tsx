/**
 * Target order: the band in force (large), every order ever made (newest first, never edited),
 * and for intensivists the form for a new band — presets from published guidance, each labelled
 * with its source, a reason, and the NEWS2 SpO₂ scale.
 *
 * Stale-view guard: the form sends `basedOnOrderId`, the newest order the writer had on screen
 * when they began editing. If another order lands first, the API answers 409 `stale_order`; the
 * history is then refreshed and the writer asked to check it and order again.
 */
import { useId, useState, type FormEvent } from 'react';
import type { OrderView } from '~/lib/charting/api-types.ts';
import { SCALE2_MAX_HIGH, TARGET_PRESETS, targetOrderSchema } from '~/lib/charting/target-input.ts';
import { ApiClientError, postJson } from '~/lib/client/fetch-json.ts';
import { usePolled } from '~/lib/client/use-polled.ts';
import type { BloodGasList } from '~/lib/bloodgas/api-types.ts';
import { formatGas, supportsScale2 } from '~/lib/bloodgas/compute.ts';
import { formatDayTime } from '~/lib/time/format.ts';
import { POLL_MS, chartKeys, formatDateTime, useRefreshChart } from './chart-shared.tsx';
import { errorText, useForm, zodFieldErrors } from '~/lib/client/use-form.ts';

export interface TargetOrderPanelProps {
  patientId: number;
  timeZone: string;
  /** From `patient.can.order` (intensivists). Without it the panel only reads. */
  canOrder: boolean;
  /** Orders already known (from the patient detail), newest first: shown until the list loads. */
  initialOrders?: OrderView[];
  co2RetentionRisk?: boolean;
}

export const STALE_ORDER_MESSAGE =
  'Someone ordered a new band while you were editing — the history is refreshed; check it and order again';

/** Short name of a preset's source for its button ("BTS 2017"); the full text is shown beside it. */
export function presetShortSource(p: { id: string; source: string }): string {
  if (p.id.startsWith('bts')) return 'BTS 2017';
  if (p.id.startsWith('tsanz')) return 'TSANZ 2015';
  return p.source.split(/[(:]/)[0]!.trim();
}
const presetById = (id: string | null) => TARGET_PRESETS.find((p) => p.id === id) ?? null;

interface FormValues {
  low: string;
  high: string;
  preset: string | null;
  reason: string;
  news2Scale: '1' | '2';
  scaleReason: string;
}
const EMPTY: FormValues = { low: '', high: '', preset: null, reason: '', news2Scale: '1', scaleReason: '' };

export default function TargetOrderPanel({
  patientId,
  timeZone,
  canOrder,
  initialOrders,
  co2RetentionRisk,
}: TargetOrderPanelProps) {
  const keys = chartKeys(patientId);
  const { data, error } = usePolled<{ orders: OrderView[] }>(keys.targets, POLL_MS, {
    fallbackData: initialOrders ? { orders: initialOrders } : undefined,
  });
  const orders = data?.orders ?? [];
  const current = orders[0] ?? null;

  return (
    <section aria-labelledby="target-title" data-testid="target-panel">
      <h2 id="target-title" className="text-lg font-bold">
        Target band
      </h2>
      {current ? (
        <div className="mt-1" data-testid="current-band">
          <p className="text-4xl font-bold tracking-tight text-ink-800 dark:text-glass-200">
            {current.low}–{current.high} <span className="text-2xl">%</span>
          </p>
          <p className="text-sm">
            NEWS2 Scale {current.news2Scale} · ordered by {current.orderedBy},{' '}
            {formatDateTime(current.orderedAt, timeZone)}
          </p>
          <p className="text-sm text-ink-600 dark:text-ink-300">Reason: {current.reason}</p>
        </div>
      ) : (
        <p className="mt-1 font-bold" data-testid="current-band">
          No band ordered yet — time in band cannot be judged.
        </p>
      )}
      {error && (
        <p role="alert" className="mt-2 text-sm text-coral-800 dark:text-coral-200">
          Could not refresh the orders: {errorText(error)}
        </p>
      )}

      {canOrder && (
        <OrderForm
          patientId={patientId}
          newestId={current?.id ?? null}
          co2RetentionRisk={co2RetentionRisk}
          timeZone={timeZone}
        />
      )}

      <h3 className="mt-4 text-base font-bold">Order history</h3>
      {orders.length === 0 ? (
        <p className="text-sm text-ink-500">No orders.</p>
      ) : (
        <ol
          className="mt-1 divide-y divide-ink-100 text-sm dark:divide-ink-800"
          data-testid="order-history"
          aria-label="Order history, newest first"
        >
          {orders.map((o, i) => {
            const preset = presetById(o.preset);
            return (
              <li key={o.id} className="py-1.5" data-order-id={o.id}>
                <p>
                  <strong>
                    {o.low}–{o.high} %
                  </strong>{' '}
                  · NEWS2 Scale {o.news2Scale}
                  {i === 0 && (
                    <span className="ml-2 rounded bg-glass-100 px-1.5 text-xs font-bold text-glass-800 dark:bg-glass-900 dark:text-glass-200">
                      in force
                    </span>
                  )}
                </p>
                <p className="text-ink-600 dark:text-ink-300">
                  {formatDateTime(o.orderedAt, timeZone)} · {o.orderedBy}
                </p>
                <p>Reason: {o.reason}</p>
                {o.scaleReason && <p>Scale reason: {o.scaleReason}</p>}
                {o.scale2Basis && <p data-testid="scale2-basis">Blood gas: {o.scale2Basis}</p>}
                {preset && (
                  <p className="text-xs text-ink-500 dark:text-ink-400">
                    Preset: {presetShortSource(preset)} — {preset.source}
                  </p>
                )}
              </li>
            );
          })}
        </ol>
      )}
    </section>
  );
}

/** Beside the Scale 2 choice: the most recent PaCO₂ and pH, or that no blood gas supports it (the decision stays with the intensivist). */
function Scale2Gas({ patientId, timeZone }: { patientId: number; timeZone: string }) {
  const { data } = usePolled<BloodGasList>(`${chartKeys(patientId).patient}/blood-gases`, POLL_MS);
  if (!data) return null;
  const g = data.bloodGases.find((x) => x.status === 'current' && x.sampleType !== 'venous') ?? null;
  if (!g)
    return (
      <p className="mt-1 text-sm font-bold" data-testid="scale2-gas">
        No blood gas supports Scale 2: no arterial or capillary PaCO₂ charted. The order will say so.
      </p>
    );
  const supports = supportsScale2({ sampleType: g.sampleType, paco2MmHg: g.paco2MmHg });
  return (
    <p className="mt-1 text-sm" data-testid="scale2-gas">
      Most recent gas ({g.sampleType}, {formatDayTime(g.sampledAt, timeZone)}):{' '}
      <strong>PaCO₂ {formatGas(g.paco2MmHg, data.gasUnit)}</strong>, <strong>pH {g.ph.toFixed(2)}</strong>
      {supports
        ? ' — shows hypercapnia.'
        : ' — does not show hypercapnia (PaCO₂ not above 6.0 kPa / 45 mmHg); the order will say so.'}
    </p>
  );
}

function OrderForm({
  patientId,
  newestId,
  co2RetentionRisk,
  timeZone,
}: {
  patientId: number;
  newestId: number | null;
  co2RetentionRisk?: boolean;
  timeZone: string;
}) {
  const uid = useId();
  const id = (f: string) => `${uid}-${f}`;
  const refresh = useRefreshChart(patientId);
  const [v, setV] = useState<FormValues>(EMPTY);
  const { errors, setErrors, clearErrors, alert, setAlert, status, setStatus, busy, submit: run } = useForm();
  /** The newest order on screen when editing began (undefined until the first edit). */
  const [basedOn, setBasedOn] = useState<number | null | undefined>(undefined);

  const high = Number(v.high);
  const highKnown = v.high.trim() !== '' && Number.isFinite(high);
  const scale2Advised = highKnown && high <= SCALE2_MAX_HIGH;
  const needsScaleReason = v.news2Scale === '2' && highKnown && high > SCALE2_MAX_HIGH;
  const newerArrived = basedOn !== undefined && basedOn !== newestId;

  function edit(patch: Partial<FormValues>) {
    if (basedOn === undefined) setBasedOn(newestId);
    setV((prev) => {
      const next = { ...prev, ...patch };
      // A preset stays only while the numbers are its numbers.
      const p = presetById(next.preset);
      if (p && (String(p.low) !== next.low.trim() || String(p.high) !== next.high.trim())) next.preset = null;
      return next;
    });
    clearErrors(...Object.keys(patch));
    setStatus('');
  }

  async function submit(e: FormEvent) {
    e.preventDefault();
    if (busy) return;
    setStatus('');
    const based = basedOn !== undefined ? basedOn : newestId;
    const parsed = targetOrderSchema.safeParse({
      low: v.low.trim() === '' ? undefined : v.low.trim(),
      high: v.high.trim() === '' ? undefined : v.high.trim(),
      preset: v.preset,
      reason: v.reason,
      news2Scale: Number(v.news2Scale),
      scaleReason: needsScaleReason ? v.scaleReason : '',
      basedOnOrderId: based,
    });
    if (!parsed.success) {
      setErrors(zodFieldErrors(parsed.error));
      return;
    }
    setErrors({});
    const ordered = await run(() => postJson(chartKeys(patientId).targets, parsed.data), {
      failurePrefix: 'Not ordered: ',
      onRefused: (_fields, err) => {
        // Someone ordered a band since this form was opened: say so, and show theirs.
        if (err instanceof ApiClientError && err.status === 409) {
          setAlert(STALE_ORDER_MESSAGE);
          setBasedOn(undefined);
          void refresh();
        }
      },
    });
    if (ordered === undefined) return;
    setV(EMPTY);
    setBasedOn(undefined);
    setStatus(`Band ${parsed.data.low}–${parsed.data.high} % ordered`);
    void refresh();
  }

  const err = (f: string) =>
    errors[f] ? (
      <p id={id(`${f}-error`)} className="mt-0.5 text-sm text-coral-700 dark:text-coral-300" data-field-error={f}>
        {errors[f]}
      </p>
    ) : null;
  const aria = (f: string, extra?: string) => ({
    'aria-invalid': errors[f] ? (true as const) : undefined,
    'aria-describedby': [extra, errors[f] ? id(`${f}-error`) : undefined].filter(Boolean).join(' ') || undefined,
  });

  return (
    <form
      onSubmit={submit}
      noValidate
      aria-label="Order a new band"
      className="mt-4 rounded-md border border-ink-200 p-3 dark:border-ink-700"
      data-testid="order-form"
    >
      <h3 className="text-base font-bold">Order a new band</h3>
      {co2RetentionRisk && <p className="text-sm">This patient is marked at risk of CO₂ retention.</p>}
      <fieldset className="mt-2">
        <legend className="text-sm font-bold">Presets from published guidance</legend>
        <div className="mt-1 grid gap-2 sm:grid-cols-2">
          {TARGET_PRESETS.map((p) => (
            <button
              key={p.id}
              type="button"
              className={`btn-quiet flex-col items-start text-left ${v.preset === p.id ? 'ring-2 ring-glass-500' : ''}`}
              aria-pressed={v.preset === p.id}
              aria-describedby={id(`src-${p.id}`)}
              onClick={() => edit({ low: String(p.low), high: String(p.high), preset: p.id })}
            >
              <span>
                {p.low}–{p.high} % · {presetShortSource(p)}
              </span>
              <span id={id(`src-${p.id}`)} className="text-xs font-normal text-ink-500 dark:text-ink-400">
                {p.source}
              </span>
            </button>
          ))}
        </div>
        {err('preset')}
      </fieldset>
      <div className="mt-3 grid grid-cols-2 gap-3">
        <div>
          <label htmlFor={id('low')} className="block text-sm font-bold">
            Lower limit (%)
          </label>
          <input
            id={id('low')}
            className="field"
            type="text"
            inputMode="numeric"
            autoComplete="off"
            value={v.low}
            onChange={(e) => edit({ low: e.target.value })}
            {...aria('low')}
          />
          {err('low')}
        </div>
        <div>
          <label htmlFor={id('high')} className="block text-sm font-bold">
            Upper limit (%)
          </label>
          <input
            id={id('high')}
            className="field"
            type="text"
            inputMode="numeric"
            autoComplete="off"
            value={v.high}
            onChange={(e) => edit({ high: e.target.value })}
            {...aria('high')}
          />
          {err('high')}
        </div>
      </div>
      <div className="mt-3">
        <label htmlFor={id('reason')} className="block text-sm font-bold">
          Reason for this band
        </label>
        <input
          id={id('reason')}
          className="field"
          type="text"
          autoComplete="off"
          value={v.reason}
          onChange={(e) => edit({ reason: e.target.value })}
          {...aria('reason')}
        />
        {err('reason')}
      </div>
      <fieldset className="mt-3" {...aria('news2Scale', id('scale-hint'))}>
        <legend className="text-sm font-bold">NEWS2 SpO₂ scale</legend>
        <div className="flex gap-4">
          <label className="inline-flex items-center gap-1">
            <input
              type="radio"
              name={id('scale')}
              value="1"
              checked={v.news2Scale === '1'}
              onChange={() => edit({ news2Scale: '1' })}
            />{' '}
            Scale 1
          </label>
          <label className="inline-flex items-center gap-1">
            <input
              type="radio"
              name={id('scale')}
              value="2"
              checked={v.news2Scale === '2'}
              onChange={() => edit({ news2Scale: '2' })}
            />{' '}
            Scale 2
          </label>
        </div>
        <p id={id('scale-hint')} className="text-xs text-ink-500 dark:text-ink-400" data-testid="scale-hint">
          {scale2Advised
            ? `Scale 2 fits this band (upper limit ${SCALE2_MAX_HIGH} % or below), for confirmed hypercapnic respiratory failure.`
            : `Scale 2 is meant for bands topping out at ${SCALE2_MAX_HIGH} % or below; with a higher band it needs a reason.`}
        </p>
        {v.news2Scale === '2' && <Scale2Gas patientId={patientId} timeZone={timeZone} />}
        {err('news2Scale')}
      </fieldset>
      {needsScaleReason && (
        <div className="mt-2">
          <label htmlFor={id('scaleReason')} className="block text-sm font-bold">
            Reason for Scale 2 with this band
          </label>
          <input
            id={id('scaleReason')}
            className="field"
            type="text"
            autoComplete="off"
            value={v.scaleReason}
            onChange={(e) => edit({ scaleReason: e.target.value })}
            {...aria('scaleReason')}
          />
          {err('scaleReason')}
        </div>
      )}
      {!needsScaleReason && err('scaleReason')}
      {newerArrived && !alert && (
        <p className="mt-2 text-sm font-bold text-amberline-700 dark:text-amberline-400">
          A newer order has arrived since you began — check the history before ordering.
        </p>
      )}
      {alert && (
        <p
          role="alert"
          className="mt-2 rounded-md border border-coral-300 bg-coral-50 p-2 text-sm text-coral-800 dark:border-coral-700 dark:bg-coral-900/30 dark:text-coral-200"
        >
          {alert}
        </p>
      )}
      <div className="mt-3 flex items-center gap-3">
        <button type="submit" className="btn-primary" disabled={busy}>
          {busy ? 'Ordering…' : 'Order band'}
        </button>
        <p role="status" aria-live="polite" className="text-sm font-bold text-glass-700 dark:text-glass-300">
          {status}
        </p>
      </div>
    </form>
  );
}
