/**
 * The obs record: newest first, 20 a page. Nothing is hidden: a corrected or entered-in-error
 * row stays, struck through, with who, when and why, and a corrected row links to the row that
 * replaced it. Current charted rows can be corrected (the entry form, prefilled, with a reason)
 * or marked entered in error (with a reason) by those who may chart.
 */
import { useState, type ReactNode } from 'react';
import type { ObsPage, ObsView, OrderView } from '~/lib/charting/api-types.ts';
import { CONSCIOUSNESS_LABELS, DEVICE_LABELS } from '~/lib/charting/obs-input.ts';
import { usePolled } from '~/lib/client/use-polled.ts';
import { isTrusted } from '~/lib/oxygenation/trust.ts';
import ObsEntryForm from './ObsEntryForm.tsx';
import EnteredInErrorForm from './EnteredInErrorForm.tsx';
import {
  OBS_PAGE_SIZE,
  POLL_MS,
  StateBadge,
  StateIcon,
  chartKeys,
  fmtFio2,
  fmtNum,
  formatDateTime,
  orderAt,
  useRefreshChart,
  SOURCE_WORDS,
} from './chart-shared.tsx';
import { bandStateOf } from '~/lib/oxygenation/band-state.ts';
import { TRACE_WORDS } from '~/lib/oxygenation/trust.ts';
import { errorText } from '~/lib/client/use-form.ts';

export interface ObsRecordTableProps {
  patientId: number;
  timeZone: string;
  /** May the signed-in user correct and mark entries (from `patient.can.chart`)? */
  canChart: boolean;
  /** Every order, newest first: each SpO₂ is judged against the band in force when taken. */
  orders?: OrderView[];
  lastCharted?: ObsView | null;
  pageSize?: number;
}

export function obsTrusted(o: ObsView): boolean {
  try {
    return isTrusted({
      at: Date.parse(o.takenAt),
      spo2: o.spo2,
      trace: o.trace,
      perfusionIndex: o.perfusionIndex,
      source: o.source,
    });
  } catch {
    return false;
  }
}

type Action = { kind: 'correct' | 'error'; obs: ObsView } | null;

export default function ObsRecordTable({
  patientId,
  timeZone,
  canChart,
  orders = [],
  lastCharted = null,
  pageSize = OBS_PAGE_SIZE,
}: ObsRecordTableProps) {
  const [page, setPage] = useState(1);
  const [action, setAction] = useState<Action>(null);
  const [message, setMessage] = useState('');
  const refresh = useRefreshChart(patientId);
  const key = chartKeys(patientId).observations(page, pageSize);
  const { data, error, isLoading } = usePolled<ObsPage>(key, POLL_MS);

  const total = data?.total ?? 0;
  const pages = Math.max(1, Math.ceil(total / pageSize));
  const items = data?.items ?? [];
  const onPage = new Set(items.map((o) => o.id));
  const columns = 12;

  const done = (words: string) => {
    setAction(null);
    setMessage(words);
    void refresh();
  };

  return (
    <section aria-labelledby="obs-record-title" data-testid="obs-record">
      <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="obs-record-title" className="text-lg font-bold">
          Obs record
        </h2>
        <p className="text-sm text-ink-500 dark:text-ink-400">
          Newest first · corrected and entered-in-error rows stay, struck through
        </p>
      </div>
      <p role="status" aria-live="polite" className="mb-1 text-sm font-bold text-glass-700 dark:text-glass-300">
        {message}
      </p>
      {error && (
        <p
          role="alert"
          className="mb-2 rounded-md border border-coral-300 bg-coral-50 p-2 text-sm text-coral-800 dark:border-coral-700 dark:bg-coral-900/30 dark:text-coral-200"
        >
          Could not load the obs record{data ? ' — showing what was loaded before' : ''}: {errorText(error)}
        </p>
      )}
      {!data && isLoading && <p>Loading obs…</p>}
      {data && (
        <div className="overflow-x-auto">
          <table className="stack-table w-full min-w-[60rem] border-collapse text-sm" data-testid="obs-table">
            <caption className="sr-only">
              Obs record, newest first, page {data.page} of {pages}
            </caption>
            <thead>
              <tr className="border-b border-ink-200 text-left text-xs uppercase tracking-wide text-ink-500 dark:border-ink-700 dark:text-ink-400">
                <th scope="col" className="py-1 pr-2">
                  Time
                </th>
                <th scope="col" className="pr-2">
                  Source
                </th>
                <th scope="col" className="pr-2">
                  SpO₂
                </th>
                <th scope="col" className="pr-2">
                  HR
                </th>
                <th scope="col" className="pr-2">
                  RR
                </th>
                <th scope="col" className="pr-2">
                  FiO₂
                </th>
                <th scope="col" className="pr-2">
                  Device
                </th>
                <th scope="col" className="pr-2">
                  Systolic BP
                </th>
                <th scope="col" className="pr-2">
                  Temp
                </th>
                <th scope="col" className="pr-2">
                  Consciousness
                </th>
                <th scope="col" className="pr-2">
                  Who
                </th>
                <th scope="col">Status</th>
              </tr>
            </thead>
            <tbody>
              {items.length === 0 && (
                <tr>
                  <td colSpan={columns} className="py-3 text-ink-500">
                    No obs charted yet.
                  </td>
                </tr>
              )}
              {items.map((o) => (
                <ObsRow
                  key={o.id}
                  o={o}
                  timeZone={timeZone}
                  orders={orders}
                  columns={columns}
                  linkable={onPage}
                  canAct={canChart && o.status === 'current' && o.source === 'charted'}
                  action={action?.obs.id === o.id ? action.kind : null}
                  onAction={(kind) => {
                    setMessage('');
                    setAction(kind ? { kind, obs: o } : null);
                  }}
                  expanded={
                    action?.obs.id === o.id ? (
                      action.kind === 'correct' ? (
                        <ObsEntryForm
                          patientId={patientId}
                          lastCharted={lastCharted}
                          timeZone={timeZone}
                          correcting={o}
                          onSaved={() => done('Correction saved; the original stays, struck through')}
                          onCancel={() => setAction(null)}
                        />
                      ) : (
                        <EnteredInErrorForm
                          url={`/api/observations/${o.id}/entered-in-error`}
                          label={`Mark obs of ${formatDateTime(o.takenAt, timeZone)} entered in error`}
                          what="The entry"
                          onDone={() => done('Marked entered in error')}
                          onCancel={() => setAction(null)}
                        />
                      )
                    ) : null
                  }
                />
              ))}
            </tbody>
          </table>
        </div>
      )}
      <nav aria-label="Obs record pages" className="mt-2 flex items-center gap-3 text-sm">
        <button
          type="button"
          className="btn-quiet"
          disabled={page <= 1}
          onClick={() => setPage((p) => Math.max(1, p - 1))}
        >
          Previous
        </button>
        <span>
          Page {page} of {pages} · {total} obs
        </span>
        <button type="button" className="btn-quiet" disabled={page >= pages} onClick={() => setPage((p) => p + 1)}>
          Next
        </button>
      </nav>
    </section>
  );
}

interface RowProps {
  o: ObsView;
  timeZone: string;
  orders: OrderView[];
  columns: number;
  linkable: Set<number>;
  canAct: boolean;
  action: 'correct' | 'error' | null;
  onAction: (kind: 'correct' | 'error' | null) => void;
  expanded: ReactNode;
}

function ObsRow({ o, timeZone, orders, columns, linkable, canAct, action, onAction, expanded }: RowProps) {
  const struck = o.status !== 'current';
  const trusted = obsTrusted(o);
  const band = orderAt(orders, o.takenAt);
  const state = bandStateOf(o.spo2, trusted, band);
  const cell = (content: ReactNode) => (struck ? <s>{content}</s> : content);
  const tone = struck ? 'text-ink-500 line-through decoration-2 dark:text-ink-400' : '';

  return (
    <>
      <tr
        id={`obs-${o.id}`}
        data-status={o.status}
        className={`border-b border-ink-100 align-top dark:border-ink-800 ${struck ? 'bg-ink-50 dark:bg-ink-950/40' : ''}`}
      >
        <td data-label="Time" className={`py-1.5 pr-2 whitespace-nowrap ${tone}`}>
          {cell(formatDateTime(o.takenAt, timeZone))}
        </td>
        <td data-label="Source" className={`pr-2 ${tone}`}>
          {cell(SOURCE_WORDS[o.source] ?? o.source)}
        </td>
        <td data-label="SpO₂" className={`pr-2 ${tone}`}>
          {cell(
            <span className="inline-flex flex-col">
              <span className="font-bold">{o.spo2 === null ? '—' : `${o.spo2} %`}</span>
              {!struck && o.spo2 !== null && state !== 'untrusted' && state !== 'no_band' && (
                <StateBadge state={state} className="text-xs" />
              )}
              {!trusted ? (
                <span className="inline-flex items-center gap-1 text-xs font-bold" data-untrusted="true">
                  <StateIcon state="untrusted" className="h-3 w-3" />
                  untrusted · {TRACE_WORDS[o.trace] ?? o.trace}
                </span>
              ) : (
                <span className="text-xs">{TRACE_WORDS[o.trace] ?? o.trace}</span>
              )}
              {o.notices.map((n) => (
                <span key={n} className="text-xs text-amberline-700 dark:text-amberline-400">
                  {n}
                </span>
              ))}
            </span>,
          )}
        </td>
        <td data-label="HR" className={`pr-2 ${tone}`}>
          {cell(fmtNum(o.heartRate))}
        </td>
        <td data-label="RR" className={`pr-2 ${tone}`}>
          {cell(fmtNum(o.respRate))}
        </td>
        <td data-label="FiO₂" className={`pr-2 whitespace-nowrap ${tone}`}>
          {cell(o.fio2 === null ? '—' : `${fmtFio2(o.fio2)}${o.fio2Estimated ? ' est.' : ''}`)}
        </td>
        <td data-label="Device" className={`pr-2 ${tone}`}>
          {cell(o.device ? `${DEVICE_LABELS[o.device]}${o.flowLpm !== null ? ` ${o.flowLpm} L/min` : ''}` : '—')}
        </td>
        <td data-label="Systolic BP" className={`pr-2 ${tone}`}>
          {cell(fmtNum(o.systolic))}
        </td>
        <td data-label="Temp" className={`pr-2 ${tone}`}>
          {cell(o.temperature === null ? '—' : o.temperature.toFixed(1))}
        </td>
        <td data-label="Consciousness" className={`pr-2 ${tone}`}>
          {cell(o.consciousness ? CONSCIOUSNESS_LABELS[o.consciousness] : '—')}
        </td>
        <td data-label="Who" className={`pr-2 ${tone}`}>
          {cell(o.recordedBy ?? '—')}
        </td>
        <td data-label="Status" className="min-w-[14rem] text-xs">
          <StatusWords o={o} timeZone={timeZone} linkable={linkable} />
          {o.note && <p className="mt-0.5 italic">Note: {o.note}</p>}
          {canAct && (
            <div className="mt-1 flex flex-wrap gap-1">
              <button
                type="button"
                className="btn-quiet px-2 py-0.5 text-xs"
                aria-expanded={action === 'correct'}
                onClick={() => onAction(action === 'correct' ? null : 'correct')}
              >
                Correct<span className="sr-only"> obs of {formatDateTime(o.takenAt, timeZone)}</span>
              </button>
              <button
                type="button"
                className="btn-quiet px-2 py-0.5 text-xs"
                aria-expanded={action === 'error'}
                onClick={() => onAction(action === 'error' ? null : 'error')}
              >
                Entered in error<span className="sr-only">: obs of {formatDateTime(o.takenAt, timeZone)}</span>
              </button>
            </div>
          )}
        </td>
      </tr>
      {expanded && (
        <tr className="border-b border-ink-200 dark:border-ink-700">
          <td colSpan={columns} className="bg-ink-50 p-3 dark:bg-ink-950/40">
            {expanded}
          </td>
        </tr>
      )}
    </>
  );
}

function StatusWords({ o, timeZone, linkable }: { o: ObsView; timeZone: string; linkable: Set<number> }) {
  const byWhen = `${o.statusBy ? ` by ${o.statusBy}` : ''}${o.statusAt ? `, ${formatDateTime(o.statusAt, timeZone)}` : ''}`;
  const link = (id: number, words: string) =>
    linkable.has(id) ? (
      <a className="underline" href={`#obs-${id}`}>
        {words}
      </a>
    ) : (
      <span>{words} (on another page)</span>
    );
  if (o.status === 'superseded') {
    return (
      <p data-testid={`status-${o.id}`}>
        <strong>Corrected</strong>
        {byWhen}
        {o.statusReason && <> — why: “{o.statusReason}”</>}
        {o.replacedById !== null && <>. {link(o.replacedById, 'See the correcting row')}</>}
      </p>
    );
  }
  if (o.status === 'entered_in_error' || o.status === 'withdrawn') {
    return (
      <p data-testid={`status-${o.id}`}>
        <strong>{o.status === 'withdrawn' ? 'Import withdrawn' : 'Entered in error'}</strong>
        {byWhen}
        {o.statusReason && <> — why: “{o.statusReason}”</>}
      </p>
    );
  }
  return (
    <p data-testid={`status-${o.id}`}>
      Current
      {o.replacesId !== null && <> · {link(o.replacesId, 'corrects an earlier row')}</>}
    </p>
  );
}
