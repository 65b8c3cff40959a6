import { useState } from 'react';
import type { EscalationList as Answer, QueueEscalation as QueueItem } from '~/lib/escalations/api-types.ts';
import { KIND_LABELS, OUTCOME_LABELS, OUTCOMES, type Outcome } from '~/lib/escalations/decide.ts';
import { postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';
import FormButtons from '~/components/FormButtons.tsx';
import { usePolled } from '~/lib/client/use-polled.ts';
import { formatAge, formatDayTime, formatMinutes, formatWhen } from '~/lib/time/format.ts';

interface Props {
  initial: Answer;
  unit?: string;
  units?: { code: string; name: string }[];
  pollMs?: number;
}

const KINDS = ['below_band', 'probe_check'] as const;

/** The outreach queue: open escalations oldest first with claim and close, filters by unit and kind, and a Closed tab (7 days). */
export default function EscalationQueue({ initial, unit: fixedUnit, units = [], pollMs = 12_000 }: Props) {
  const [tab, setTab] = useState<'open' | 'closed'>('open');
  const [unit, setUnit] = useState(fixedUnit ?? '');
  const [kind, setKind] = useState('');
  const [notice, setNotice] = useState<string | null>(null);
  const q = new URLSearchParams({ state: tab, ...(unit ? { unit } : {}), ...(kind ? { kind } : {}) });
  const key = `/api/escalations?${q}`;
  const unfiltered = tab === 'open' && !unit && !kind;
  const { data, error, mutate } = usePolled<Answer>(key, pollMs, { fallbackData: unfiltered ? initial : undefined });
  const list = data?.escalations ?? [];
  const now = Date.parse(data?.generatedAt ?? initial.generatedAt);

  return (
    <div>
      <div className="mb-3 flex flex-wrap items-end gap-3">
        <div role="tablist" aria-label="Escalations" className="flex gap-1">
          {(['open', 'closed'] as const).map((t) => (
            <button
              key={t}
              type="button"
              role="tab"
              aria-selected={tab === t}
              data-testid={`queue-tab-${t}`}
              className={tab === t ? 'btn-primary' : 'btn-quiet'}
              onClick={() => setTab(t)}
            >
              {t === 'open' ? 'Open' : 'Closed (last 7 days)'}
            </button>
          ))}
        </div>
        {units.length > 1 && (
          <label className="text-sm font-bold">
            Unit
            <select
              className="field ml-1 py-0.5"
              value={unit}
              onChange={(e) => setUnit(e.target.value)}
              data-testid="queue-unit"
            >
              <option value="">all units</option>
              {units.map((u) => (
                <option key={u.code} value={u.code}>
                  {u.name}
                </option>
              ))}
            </select>
          </label>
        )}
        <label className="text-sm font-bold">
          Kind
          <select
            className="field ml-1 py-0.5"
            value={kind}
            onChange={(e) => setKind(e.target.value)}
            data-testid="queue-kind"
          >
            <option value="">below band and probe checks</option>
            {KINDS.map((k) => (
              <option key={k} value={k}>
                {KIND_LABELS[k]}
              </option>
            ))}
          </select>
        </label>
      </div>
      <p
        role="status"
        aria-live="polite"
        className="min-h-[1.5rem] text-sm font-bold text-glass-800 dark:text-glass-200"
        data-testid="queue-notice"
      >
        {notice}
      </p>
      {error && (
        <p
          role="alert"
          className="mb-3 rounded-md border-2 border-amberline-400 bg-amberline-100 p-3 font-bold text-amberline-700"
          data-testid="queue-stale"
        >
          Queue not updating — retrying on its own.
        </p>
      )}
      {list.length === 0 && (
        <p className="panel" data-testid="queue-empty">
          {tab === 'open' ? 'No open escalations.' : 'Nothing closed in the last 7 days.'}
        </p>
      )}
      <ol className="space-y-3" data-testid={tab === 'open' ? 'escalation-queue' : 'closed-queue'}>
        {list.map((e) =>
          tab === 'open' ? (
            <Row
              key={e.id}
              e={e}
              now={now}
              onChange={(text) => {
                if (text) setNotice(text);
                void mutate();
              }}
            />
          ) : (
            <ClosedRow key={e.id} e={e} />
          ),
        )}
      </ol>
    </div>
  );
}

/** Last 30 minutes of SpO₂ as a small line, with the lower band limit dashed; said in words for screen readers. */
function Trend({
  points,
  band,
  now,
}: {
  points: { t: number; v: number }[];
  band: { low: number; high: number } | null;
  now: number;
}) {
  if (points.length < 2)
    return <span className="text-sm text-ink-500">no trend (fewer than 2 minutes of readings)</span>;
  const w = 120;
  const h = 32;
  const from = now - 30 * 60_000;
  const lo = Math.min(...points.map((p) => p.v), band?.low ?? 100) - 1;
  const hi = Math.max(...points.map((p) => p.v), band?.high ?? 0) + 1;
  const x = (t: number) => ((t - from) / (30 * 60_000)) * w;
  const y = (v: number) => h - ((v - lo) / (hi - lo)) * h;
  const words = `SpO₂ last 30 min: from ${points[0]!.v} to ${points[points.length - 1]!.v} %, lowest ${Math.min(...points.map((p) => p.v))} %`;
  return (
    <svg
      width={w}
      height={h}
      role="img"
      aria-label={words}
      data-testid="queue-trend"
      className="inline-block align-middle text-ink-700 dark:text-ink-200"
    >
      {band && (
        <line
          x1={0}
          x2={w}
          y1={y(band.low)}
          y2={y(band.low)}
          stroke="currentColor"
          strokeDasharray="3 3"
          strokeOpacity={0.5}
        />
      )}
      <polyline
        fill="none"
        stroke="currentColor"
        strokeWidth={1.6}
        points={points.map((p) => `${x(p.t).toFixed(1)},${y(p.v).toFixed(1)}`).join(' ')}
      />
    </svg>
  );
}

function Row({ e, now, onChange }: { e: QueueItem; now: number; onChange: (notice: string | null) => void }) {
  const [closing, setClosing] = useState(false);
  const [outcome, setOutcome] = useState<Outcome | ''>('');
  const [note, setNote] = useState('');
  const { alert: error, setAlert, act: attempt } = useForm();
  const urgent = e.severity === 'urgent';
  const zone = e.unit.timeZone;
  const where = `bed ${e.bedLabel ?? '—'} (${e.unit.name})`;

  async function act(url: string, body: unknown, done: string) {
    await attempt(done, () => postJson(url, body), {
      // A refused close names the field at fault (the outcome, the note): say that, not the summary.
      onRefused: (fields) => {
        const first = Object.values(fields)[0];
        if (first) setAlert(first);
      },
      after: () => {
        setClosing(false);
        onChange(done);
      },
    });
  }

  return (
    <li
      className={`panel border-l-8 ${e.kind === 'below_band' ? (urgent ? 'border-l-coral-600' : 'border-l-coral-400') : 'border-l-ink-400'}`}
      data-testid={`escalation-${e.id}`}
      data-state={e.state}
    >
      <div className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <span className="text-lg font-bold">
          {urgent ? 'URGENT · ' : ''}
          {e.kindLabel}
        </span>
        <span className="font-mono">
          {e.unit.name} · bed {e.bedLabel ?? '—'}
        </span>
        <a className="font-bold underline" href={`/patients/${e.patient.id}`}>
          {e.patient.label}
        </a>
        <span data-testid="escalation-raised">
          raised {formatWhen(e.raisedAt, zone, now)} · {formatAge(e.raisedAt, now)}
        </span>
        <span data-testid="escalation-state">
          {e.state === 'claimed' ? `claimed by ${e.claimedBy}` : 'not yet claimed'}
        </span>
        {e.notifyCount > 1 && <span>{e.notifyCount} e-mails sent</span>}
        {e.backInBandAt && (
          <span className="font-bold text-glass-700">back in band since {formatWhen(e.backInBandAt, zone, now)}</span>
        )}
      </div>
      <div className="mt-1 flex flex-wrap items-center gap-x-4 gap-y-1 text-sm">
        <span data-testid="escalation-now">
          {e.current ? (
            <>
              SpO₂ now <strong className="text-base">{e.current.spo2} %</strong>
              {e.current.trusted ? '' : ' (not trusted)'} · {e.current.source === 'charted' ? 'charted' : 'monitor'}{' '}
              {formatWhen(e.current.at, zone, now)} ({formatAge(e.current.at, now)})
            </>
          ) : (
            'no SpO₂ in the last 75 min'
          )}
        </span>
        <Trend points={e.trend ?? []} band={e.evidence?.band ?? null} now={now} />
        {e.evidence?.band && (
          <span className="text-ink-600 dark:text-ink-300">
            band {e.evidence.band.low}–{e.evidence.band.high} %
            {e.evidence.nadir != null ? ` · lowest trusted SpO₂ in the run ${e.evidence.nadir} %` : ''}
          </span>
        )}
      </div>
      <div className="mt-2 flex flex-wrap items-center gap-2">
        {e.can.claim && (
          <button
            type="button"
            className="btn-primary"
            onClick={() => act(`/api/escalations/${e.id}/claim`, {}, `You claimed the escalation for ${where}.`)}
          >
            Claim
          </button>
        )}
        {e.can.close && !closing && (
          <button type="button" className="btn-quiet" onClick={() => setClosing(true)}>
            Close…
          </button>
        )}
      </div>
      {closing && (
        <form
          noValidate
          className="mt-3 grid max-w-xl gap-2"
          aria-label={`Close escalation ${e.id}`}
          onSubmit={(ev) => {
            ev.preventDefault();
            void act(
              `/api/escalations/${e.id}/close`,
              { outcome: outcome || undefined, note: note || undefined },
              `Escalation for ${where} closed: ${outcome ? OUTCOME_LABELS[outcome] : ''}. It is under “Closed (last 7 days)”.`,
            );
          }}
        >
          <label className="block">
            <span className="mb-1 block font-bold">Outcome</span>
            <select
              className="field"
              value={outcome}
              onChange={(ev) => setOutcome(ev.target.value as Outcome)}
              required
            >
              <option value="">Choose the outcome…</option>
              {OUTCOMES.map((o) => (
                <option key={o} value={o}>
                  {OUTCOME_LABELS[o]}
                </option>
              ))}
            </select>
          </label>
          <label className="block">
            <span className="mb-1 block font-bold">Note (optional)</span>
            <textarea
              className="field"
              rows={2}
              value={note}
              onChange={(ev) => setNote(ev.target.value)}
              maxLength={1000}
            />
          </label>
          <FormButtons action="Close escalation" onCancel={() => setClosing(false)} />
        </form>
      )}
      {error && (
        <p role="alert" className="mt-2 text-coral-700 dark:text-coral-300">
          {error}
        </p>
      )}
    </li>
  );
}

function ClosedRow({ e }: { e: QueueItem }) {
  const zone = e.unit.timeZone;
  const mins = (m: number | null) => (m === null ? '—' : formatMinutes(m));
  return (
    <li className="panel border-l-8 border-l-ink-300" data-testid={`closed-${e.id}`}>
      <div className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <span className="font-bold">
          {e.severity === 'urgent' ? 'URGENT · ' : ''}
          {e.kindLabel}
        </span>
        <span className="font-mono">
          {e.unit.name} · bed {e.bedLabel ?? '—'}
        </span>
        <a className="underline" href={`/patients/${e.patient.id}`}>
          {e.patient.label}
        </a>
        <span>raised {formatDayTime(e.raisedAt, zone)}</span>
      </div>
      <p className="mt-1 text-sm" data-testid="closed-outcome">
        {e.outcomeLabel ?? '—'} · closed {e.closedAt ? formatDayTime(e.closedAt, zone) : '—'} by{' '}
        {e.closedBy ?? 'Ebbwatch'}
        {' · '}raised → claimed {mins(e.raisedToClaimedMin)}
        {e.claimedBy ? ` (${e.claimedBy})` : ''} · claimed → closed {mins(e.claimedToClosedMin)}
        {e.closeNote ? ` — “${e.closeNote}”` : ''}
      </p>
    </li>
  );
}
