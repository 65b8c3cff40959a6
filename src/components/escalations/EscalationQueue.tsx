import { useState } from 'react';
import useSWR from 'swr';
import type { EscalationView } from '~/lib/server/escalations/service.ts';
import { OUTCOME_LABELS, OUTCOMES, type Outcome } from '~/lib/escalations/decide.ts';
import { formatMinutes } from '~/lib/board/tiles.ts';
import { ApiClientError, fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { formatWhen } from '~/lib/time/format.ts';

interface Props { initial: { escalations: EscalationView[]; generatedAt: string }; me: { role: string }; unit?: string; pollMs?: number }

/** Open escalations, oldest first, with claim and close (outcome required). */
export default function EscalationQueue({ initial, me, unit, pollMs = 12_000 }: Props) {
  const key = `/api/escalations?state=open${unit ? `&unit=${encodeURIComponent(unit)}` : ''}`;
  const { data, error, mutate } = useSWR<{ escalations: EscalationView[]; generatedAt: string }>(key, fetchJson, {
    fallbackData: initial, refreshInterval: pollMs,
    onErrorRetry: (_e, _k, _c, revalidate, { retryCount }) => { setTimeout(() => revalidate({ retryCount }), 5_000); },
  });
  const list = data?.escalations ?? [];
  const now = Date.parse(data?.generatedAt ?? initial.generatedAt);
  const canClaim = ['nurse', 'charge', 'outreach'].includes(me.role);
  const canClose = ['charge', 'outreach'].includes(me.role);

  return (
    <div>
      {error && <p role="alert" className="mb-3 rounded-md border-2 border-amberline-400 bg-amberline-100 p-3 font-bold text-amberline-700" data-testid="queue-stale">Queue not updating — retrying on its own.</p>}
      {list.length === 0 && <p className="panel" data-testid="queue-empty">No open escalations.</p>}
      <ol className="space-y-3" data-testid="escalation-queue">
        {list.map((e) => <Row key={e.id} e={e} now={now} canClaim={canClaim} canClose={canClose} onChange={() => mutate()} />)}
      </ol>
    </div>
  );
}

function Row({ e, now, canClaim, canClose, onChange }: { e: EscalationView; now: number; canClaim: boolean; canClose: boolean; onChange: () => void }) {
  const [closing, setClosing] = useState(false);
  const [outcome, setOutcome] = useState<Outcome | ''>('');
  const [note, setNote] = useState('');
  const [error, setError] = useState<string | null>(null);
  const since = Math.max(0, Math.floor((now - Date.parse(e.raisedAt)) / 60_000));
  const urgent = e.severity === 'urgent';

  async function act(url: string, body: unknown) {
    setError(null);
    try {
      await postJson(url, body);
      setClosing(false);
      onChange();
    } catch (err) {
      setError(err instanceof ApiClientError ? Object.values(err.fields)[0] ?? err.message : String(err));
    }
  }

  return (
    <li className={`panel border-l-8 ${e.kind === 'below_band' ? (urgent ? 'border-l-coral-600' : 'border-l-coral-400') : 'border-l-ink-400'}`} data-testid={`escalation-${e.id}`} data-state={e.state}>
      <div className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <span className="text-lg font-bold">{urgent ? 'URGENT · ' : ''}{e.kindLabel}</span>
        <span className="font-mono">{e.unit.name} · bed {e.bedLabel ?? '—'}</span>
        <a className="font-bold underline" href={`/patients/${e.patient.id}`}>{e.patient.label}</a>
        <span>raised {formatMinutes(since)} ago</span>
        <span data-testid="escalation-state">{e.state === 'claimed' ? `claimed by ${e.claimedBy}` : 'not yet claimed'}</span>
        {e.notifyCount > 1 && <span>{e.notifyCount} e-mails sent</span>}
        {e.backInBandAt && <span className="font-bold text-glass-700">back in band since {formatWhen(e.backInBandAt, e.unit.timeZone, now)}</span>}
      </div>
      {e.evidence?.band && (
        <p className="mt-1 text-sm text-ink-600 dark:text-ink-300">
          Band {e.evidence.band.low}–{e.evidence.band.high} %{e.evidence.nadir != null ? ` · lowest trusted SpO₂ ${e.evidence.nadir} %` : ''}
          {e.evidence.lastReadings?.length ? ` · last readings ${e.evidence.lastReadings.map((r) => `${r.spo2 ?? '—'}${r.trace === 'clean' || r.trace === 'weak' ? '' : ` (${r.trace})`}`).join(', ')}` : ''}
        </p>
      )}
      <div className="mt-2 flex flex-wrap items-center gap-2">
        {canClaim && e.state === 'raised' && <button className="btn-primary" onClick={() => act(`/api/escalations/${e.id}/claim`, {})}>Claim</button>}
        {canClose && !closing && <button className="btn-quiet" onClick={() => setClosing(true)}>Close…</button>}
      </div>
      {closing && (
        <form noValidate className="mt-3 grid max-w-xl gap-2" aria-label={`Close escalation ${e.id}`} onSubmit={(ev) => { ev.preventDefault(); void act(`/api/escalations/${e.id}/close`, { outcome: outcome || undefined, note: note || undefined }); }}>
          <label className="block">
            <span className="mb-1 block font-bold">Outcome</span>
            <select className="field" value={outcome} onChange={(ev) => setOutcome(ev.target.value as Outcome)} required>
              <option value="">Choose the outcome…</option>
              {OUTCOMES.map((o) => <option key={o} value={o}>{OUTCOME_LABELS[o]}</option>)}
            </select>
          </label>
          <label className="block">
            <span className="mb-1 block font-bold">Note (optional)</span>
            <textarea className="field" rows={2} value={note} onChange={(ev) => setNote(ev.target.value)} maxLength={1000} />
          </label>
          <div className="flex gap-2">
            <button className="btn-primary" type="submit">Close escalation</button>
            <button className="btn-quiet" type="button" onClick={() => setClosing(false)}>Cancel</button>
          </div>
        </form>
      )}
      {error && <p role="alert" className="mt-2 text-coral-700 dark:text-coral-300">{error}</p>}
    </li>
  );
}
