import { useEffect, useMemo, useRef, useState } from 'react';
import useSWR from 'swr';
import type { BoardResponse, BoardTileView } from '~/lib/board/api-types.ts';
import type { BoardTile } from '~/lib/board/tiles.ts';
import { formatMinutes, latestWords, monitorWords, stateWords } from '~/lib/board/tiles.ts';
import { DEVICE_LABELS } from '~/lib/charting/obs-input.ts';
import { fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { usePolled } from '~/lib/client/use-polled.ts';
import { errorText, useForm } from '~/lib/client/use-form.ts';
import { KIND_LABELS, type EscalationKind } from '~/lib/escalations/decide.ts';
import { formatClock, formatClockSeconds } from '~/lib/time/format.ts';

interface Props {
  initial: BoardResponse;
  me: { id: number; role: string };
  pollMs?: number;
}

const timeIn = (iso: string | number, zone: string) => formatClockSeconds(iso, zone);

/** The ward board: server-rendered first, then kept fresh by polling; stale data is said plainly. */
export default function BoardView({ initial, me, pollMs = 12_000 }: Props) {
  const key = `/api/board?unit=${encodeURIComponent(initial.unit.code)}`;
  const { data, error, mutate } = usePolled<BoardResponse>(key, pollMs, {
    fallbackData: initial,
    revalidateOnFocus: true,
  });
  const board = data ?? initial;
  const [mine, setMine] = useState(false);
  const nurses = useSWR<{ nurses: { id: number; name: string }[] }>(
    board.can.assignNurses ? '/api/nurses' : null,
    fetchJson,
  );
  const filtered = useMemo(
    () => (mine ? board.tiles.filter((t) => t.nurse?.id === me.id) : board.tiles),
    [board, mine, me.id],
  );
  const zone = board.unit.timeZone;
  // While keyboard focus is inside the board, tiles keep their places (new data, old order): nothing
  // jumps under the focus. The concern order comes back once focus leaves.
  const [focusInside, setFocusInside] = useState(false);
  const listRef = useRef<HTMLUListElement>(null);
  // Focus can also leave by the focused control vanishing (a claim button once claimed): re-check on
  // every focus change and pointer press anywhere, and on every poll.
  useEffect(() => {
    const check = () => setFocusInside(Boolean(listRef.current?.contains(document.activeElement)));
    const later = () => setTimeout(check, 0);
    document.addEventListener('focusin', check);
    document.addEventListener('pointerdown', later);
    return () => {
      document.removeEventListener('focusin', check);
      document.removeEventListener('pointerdown', later);
    };
  }, []);
  // biome-ignore lint/correctness/useExhaustiveDependencies: re-read on every poll (new data may move focus)
  useEffect(() => {
    setFocusInside(Boolean(listRef.current?.contains(document.activeElement)));
  }, [data]);
  const order = useRef<number[]>(filtered.map((t) => t.bedId));
  const tiles = useMemo(() => {
    if (!focusInside) return filtered;
    const pos = new Map(order.current.map((id, i) => [id, i]));
    return [...filtered].sort((a, b) => (pos.get(a.bedId) ?? 1e9) - (pos.get(b.bedId) ?? 1e9));
  }, [filtered, focusInside]);
  useEffect(() => {
    order.current = tiles.map((t) => t.bedId);
  }, [tiles]);
  // Changes of concern are announced politely to screen readers (never on the first paint).
  const [announcement, setAnnouncement] = useState('');
  const previous = useRef<Map<number, string> | null>(null);
  useEffect(() => {
    const now = new Map(board.tiles.map((t) => [t.bedId, t.concern.reason]));
    if (previous.current) {
      const changed = board.tiles.filter(
        (t) =>
          t.patient &&
          previous.current!.has(t.bedId) &&
          previous.current!.get(t.bedId) !== t.concern.reason &&
          previous.current!.get(t.bedId)!.replace(/\d+/g, '#') !== t.concern.reason.replace(/\d+/g, '#'),
      );
      if (changed.length) setAnnouncement(changed.map((t) => `Bed ${t.bedLabel}: ${t.concern.reason}.`).join(' '));
    }
    previous.current = now;
  }, [board]);
  const [notice, setNotice] = useState<{ ok: boolean; text: string } | null>(null);

  return (
    <div>
      <div className="mb-3 flex flex-wrap items-center gap-4">
        <p className="text-sm text-ink-600 dark:text-ink-300" data-testid="board-as-of">
          as of <time dateTime={board.generatedAt}>{timeIn(board.generatedAt, zone)}</time> · refreshes every{' '}
          {Math.round(pollMs / 1000)} s
        </p>
        {board.can.filterMine && (
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={mine} onChange={(e) => setMine(e.target.checked)} data-testid="my-beds" />{' '}
            my beds only
          </label>
        )}
      </div>
      {error && (
        <div
          role="alert"
          data-testid="stale-banner"
          className="mb-4 rounded-md border-2 border-amberline-400 bg-amberline-100 p-3 font-bold text-amberline-700 dark:bg-amberline-700/30 dark:text-amberline-100"
        >
          Board not updating — showing data from {timeIn(board.generatedAt, zone)}. Retrying on its own; check the
          bedside if in doubt.
        </div>
      )}
      <BoardKey />
      <p className="sr-only" aria-live="polite" data-testid="board-announcer">
        {announcement}
      </p>
      {notice && (
        <p
          role={notice.ok ? 'status' : 'alert'}
          data-testid="board-notice"
          className={`mb-3 rounded-md p-2 text-sm font-bold ${notice.ok ? 'bg-glass-50 text-glass-900 dark:bg-glass-900/40 dark:text-glass-100' : 'border-2 border-coral-500 bg-coral-50 text-coral-900 dark:bg-coral-900/30 dark:text-coral-100'}`}
        >
          {notice.text}
        </p>
      )}
      {focusInside && (
        <p className="sr-only" data-testid="board-order-held">
          Tile order held while you are in the board.
        </p>
      )}
      {tiles.length === 0 && <p className="panel">No beds to show{mine ? ' assigned to you' : ''}.</p>}
      <ul
        ref={listRef}
        className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3 xl:grid-cols-4"
        data-testid="board-tiles"
        data-order-held={focusInside ? 'yes' : 'no'}
        onFocus={() => setFocusInside(true)}
        onBlur={(e) => {
          if (!e.currentTarget.contains(e.relatedTarget as Node | null)) setFocusInside(false);
        }}
      >
        {tiles.map((tile) => (
          <Tile
            key={tile.bedId}
            tile={tile}
            zone={zone}
            nurses={nurses.data?.nurses ?? null}
            onDone={(text, ok) => {
              setNotice({ ok, text });
              if (ok) void mutate();
            }}
          />
        ))}
      </ul>
    </div>
  );
}

const TONE: Record<string, string> = {
  below: 'border-coral-500 bg-coral-50 dark:bg-coral-900/25',
  above: 'border-iris-500 bg-iris-50 dark:bg-iris-900/25',
  in: 'border-glass-500 bg-white dark:bg-ink-900',
  untrusted: 'border-ink-400 border-dashed ebb-hatched bg-white dark:bg-ink-900',
  no_band: 'border-ink-500 border-dashed bg-white dark:bg-ink-900',
  no_reading: 'border-ink-300 bg-white dark:bg-ink-900',
};

function StateMark({ name }: { name: string }) {
  // Shape carries the state as well as colour: chevron down, chevron up, dot, hollow ring.
  const common = { width: 22, height: 22, viewBox: '0 0 24 24' } as const;
  if (name === 'below')
    return (
      <svg {...common} aria-hidden="true" className="text-coral-600 dark:text-coral-300">
        <path
          d="M4 8l8 8 8-8"
          fill="none"
          stroke="currentColor"
          strokeWidth="3.5"
          strokeLinecap="round"
          strokeLinejoin="round"
        />
      </svg>
    );
  if (name === 'above')
    return (
      <svg {...common} aria-hidden="true" className="text-iris-600 dark:text-iris-300">
        <path
          d="M4 16l8-8 8 8"
          fill="none"
          stroke="currentColor"
          strokeWidth="3.5"
          strokeLinecap="round"
          strokeLinejoin="round"
        />
      </svg>
    );
  if (name === 'in')
    return (
      <svg {...common} aria-hidden="true" className="text-glass-600 dark:text-glass-300">
        <circle cx="12" cy="12" r="6" fill="currentColor" />
      </svg>
    );
  if (name === 'untrusted')
    return (
      <svg {...common} aria-hidden="true" className="text-ink-500 dark:text-ink-300">
        <circle cx="12" cy="12" r="7" fill="none" stroke="currentColor" strokeWidth="2.5" strokeDasharray="3 3" />
      </svg>
    );
  return (
    <svg {...common} aria-hidden="true" className="text-ink-400">
      <rect x="5" y="11" width="14" height="3" fill="currentColor" />
    </svg>
  );
}

/** Every colour and shape the board uses, in words: open on demand, always printed. */
function BoardKey() {
  const rows: [string, string, string][] = [
    ['below', 'Below band', 'coral, chevron down'],
    ['above', 'Above band', 'violet, chevron up'],
    ['in', 'In band', 'sea-glass, dot'],
    ['untrusted', 'Untrusted reading (with the reason)', 'hatched tile, dashed ring'],
    ['no_reading', 'No current reading (monitor silent, or nothing charted)', 'plain tile, bar'],
  ];
  const list = (
    <ul className="grid gap-1 text-sm sm:grid-cols-2">
      {rows.map(([name, words, look]) => (
        <li key={name} className="flex items-center gap-2">
          <StateMark name={name} />
          <span>
            <strong>{words}</strong> — {look}
          </span>
        </li>
      ))}
      <li className="flex items-center gap-2">
        <span className="rounded border-2 border-dashed border-ink-500 px-1 text-xs">dashed</span>
        <span>
          <strong>No band ordered</strong> — dashed border
        </span>
      </li>
      <li>
        <strong>overdue</strong> (underlined) — no obs charted within the unit's limit
      </li>
      <li>
        <strong>monitor silent since hh:mm</strong> — no device reading within the unit's limit
      </li>
      <li>Dark strip — an open escalation: kind, severity, claimed or not, time raised</li>
    </ul>
  );
  return (
    <>
      <details className="mb-3 print:hidden" data-testid="board-key">
        <summary className="cursor-pointer text-sm font-bold">Key to colours and shapes</summary>
        <div className="mt-2 rounded-md border border-ink-200 p-2 dark:border-ink-700">{list}</div>
      </details>
      <div className="hidden print:block" data-testid="board-key-print">
        <h2 className="font-bold">Key</h2>
        {list}
      </div>
    </>
  );
}

function escalationWords(e: NonNullable<BoardTile['escalation']>, zone: string): string {
  // Kind, severity, state and time, each said once.
  const kind = KIND_LABELS[e.kind as EscalationKind] ?? 'Escalation';
  return `${kind}${e.severity === 'urgent' ? ' · urgent' : ''} · ${e.state === 'claimed' ? `claimed by ${e.claimedBy ?? 'someone'}` : 'not yet claimed'} · raised ${formatClock(e.raisedAt, zone)}`;
}

function Tile({
  tile,
  zone,
  nurses,
  onDone,
}: {
  tile: BoardTileView;
  zone: string;
  nurses: { id: number; name: string }[] | null;
  onDone: (text: string, ok: boolean) => void;
}) {
  const assigning = useForm();
  const claiming = useForm();
  const assignError = assigning.alert;
  if (!tile.patient) {
    return (
      <li
        className="rounded-lg border border-dashed border-ink-200 p-3 text-ink-500 dark:border-ink-700 dark:text-ink-400"
        data-testid={`tile-${tile.bedLabel}`}
        data-concern="empty"
      >
        <span className="font-mono font-bold">{tile.bedLabel}</span> · empty
        <span className="sr-only">{tile.sentence}</span>
      </li>
    );
  }
  const tone = TONE[tile.state.name] ?? TONE.no_reading;
  const spo2 = tile.latest?.spo2;
  async function assign(value: string) {
    const name = value === '' ? null : (nurses?.find((n) => String(n.id) === value)?.name ?? 'the nurse');
    const failure = `Bed ${tile.bedLabel}: assignment not saved — `;
    const saved = await assigning.act(
      name ? `Bed ${tile.bedLabel}: ${name} assigned.` : `Bed ${tile.bedLabel}: no nurse assigned now.`,
      () => postJson(`/api/beds/${tile.bedId}/assignment`, { nurseId: value === '' ? null : Number(value) }, 'PUT'),
      { failurePrefix: failure, onRefused: (_f, err) => onDone(`${failure}${errorText(err)}`, false) },
    );
    if (saved)
      onDone(name ? `Bed ${tile.bedLabel}: ${name} assigned.` : `Bed ${tile.bedLabel}: no nurse assigned now.`, true);
  }
  const esc = tile.escalation;
  const mayClaim = tile.can.claim;
  async function claim() {
    if (!esc) return;
    const claimed = await claiming.submit(() => postJson(`/api/escalations/${esc.id}/claim`, {}), {
      onRefused: (_f, err) => onDone(`Bed ${tile.bedLabel}: not claimed — ${errorText(err)}`, false),
    });
    if (claimed !== undefined)
      onDone(
        `Bed ${tile.bedLabel}: you claimed the ${(KIND_LABELS[esc.kind as EscalationKind] ?? 'escalation').toLowerCase()}.`,
        true,
      );
  }
  return (
    <li
      className={`relative rounded-lg border-2 p-3 shadow-sm ${tone}`}
      data-testid={`tile-${tile.bedLabel}`}
      data-concern={tile.concern.key}
      data-state={tile.state.name}
    >
      {/* The whole tile is one link named by the sentence; the visible parts below are hidden from
          screen readers and hold nothing focusable (WCAG: no focusable element inside aria-hidden). */}
      <a href={`/patients/${tile.patient.id}`} className="peer absolute inset-0 rounded-lg">
        <span className="sr-only" data-testid="tile-sentence">
          {tile.sentence}
        </span>
      </a>
      <div aria-hidden="true">
        <div className="flex items-baseline justify-between gap-2">
          <span className="font-mono text-lg font-bold underline-offset-2 peer-hover:underline">{tile.bedLabel}</span>
          <span className="font-bold">{tile.patient.label}</span>
          <span className="rounded bg-ink-100 px-1.5 text-sm dark:bg-ink-800">
            {tile.band
              ? `band ${tile.band.low}–${tile.band.high}${tile.band.news2Scale === 2 ? ' · S2' : ''}`
              : 'no band ordered'}
          </span>
        </div>
        <div className="mt-1 flex items-center gap-2">
          <StateMark name={tile.state.name} />
          <span className="text-4xl font-bold tabular-nums" data-testid="tile-spo2">
            {spo2 ?? '—'}
            <span className="text-lg font-normal">{spo2 != null ? ' %' : ''}</span>
          </span>
          <span className="font-bold" data-testid="tile-state">
            {stateWords(tile)}
          </span>
        </div>
        {tile.latest && (
          <p className="text-sm text-ink-600 dark:text-ink-300" data-testid="tile-age">
            {spo2 != null ? `${spo2} % · ` : ''}
            {latestWords(tile)}
          </p>
        )}
        {monitorWords(tile) && (
          <p className="text-sm font-bold text-amberline-700 dark:text-amberline-400" data-testid="tile-monitor">
            {monitorWords(tile)}
          </p>
        )}
        {tile.latest?.belowCalibratedRange && (
          <p className="text-sm font-bold">below calibrated range — confirm with arterial blood gas</p>
        )}
        <p className="mt-1 text-sm" data-testid="tile-reason">
          <strong>{tile.concern.reason}</strong>
        </p>
        <dl className="mt-2 grid grid-cols-2 gap-x-3 text-sm">
          <div>
            <dt className="inline text-ink-500 dark:text-ink-300">trace </dt>
            <dd className="inline" data-testid="tile-trace">
              {tile.latest
                ? tile.latest.trusted
                  ? tile.latest.trace
                  : `not trusted: ${tile.latest.untrustedReason}`
                : '—'}
            </dd>
          </div>
          <div>
            <dt className="inline text-ink-500 dark:text-ink-300">HR </dt>
            <dd className="inline">{tile.latest?.heartRate ?? '—'}</dd>
          </div>
          <div className="col-span-2">
            <dt className="inline text-ink-500 dark:text-ink-300">O₂ </dt>
            <dd className="inline">
              {tile.oxygen.device ? DEVICE_LABELS[tile.oxygen.device] : '—'}
              {tile.oxygen.fio2 !== null
                ? ` · FiO₂ ${tile.oxygen.fio2.toFixed(2)}${tile.oxygen.fio2Estimated ? ' (est.)' : ''}`
                : ''}
            </dd>
          </div>
          <div>
            <dt className="inline text-ink-500 dark:text-ink-300">obs </dt>
            <dd className={`inline ${tile.overdue ? 'font-bold underline decoration-amberline-400 decoration-2' : ''}`}>
              {tile.minutesSinceCharted === null ? 'none' : `${formatMinutes(tile.minutesSinceCharted)} ago`}
              {tile.overdue ? ' · overdue' : ''}
            </dd>
          </div>
          <div>
            <dt className="inline text-ink-500 dark:text-ink-300">NEWS2 </dt>
            <dd className="inline">{tile.news2 ? tile.news2.total : 'incomplete'}</dd>
          </div>
        </dl>
        {tile.occultHypoxaemia && (
          <p
            className="mt-2 flex items-start gap-1 rounded border-2 border-coral-600 bg-white px-2 py-1 text-sm font-bold text-coral-800 dark:border-coral-300 dark:bg-ink-900 dark:text-coral-200"
            data-testid="tile-occult"
          >
            <svg width="16" height="16" viewBox="0 0 24 24" aria-hidden="true" className="mt-0.5 shrink-0">
              <path d="M12 3l10 18H2z" fill="none" stroke="currentColor" strokeWidth="3" strokeLinejoin="round" />
            </svg>
            <span>
              Occult hypoxaemia · gas SaO₂ {tile.occultHypoxaemia.sao2} % while SpO₂ read{' '}
              {tile.occultHypoxaemia.spo2AtSample} % ({formatClock(tile.occultHypoxaemia.sampledAt, zone)}) ·{' '}
              {tile.occultHypoxaemia.state}
            </span>
          </p>
        )}
        {esc && (
          <p
            className="mt-2 rounded bg-ink-900 px-2 py-1 text-sm text-white dark:bg-ink-700"
            data-testid="tile-escalation"
          >
            {escalationWords(esc, zone)}
          </p>
        )}
      </div>
      <div className="relative z-10 mt-2 text-sm">
        {mayClaim && (
          <button type="button" className="btn-primary mb-2 py-0.5" onClick={claim} data-testid="tile-claim">
            Claim for bed {tile.bedLabel}
          </button>
        )}
        {nurses ? (
          <label className="flex items-center gap-2">
            <span className="text-ink-500 dark:text-ink-300">nurse</span>
            <select
              className="field py-0.5"
              value={tile.nurse?.id ?? ''}
              onChange={(e) => assign(e.target.value)}
              aria-label={`Nurse for bed ${tile.bedLabel}`}
            >
              <option value="">unassigned</option>
              {nurses.map((n) => (
                <option key={n.id} value={n.id}>
                  {n.name}
                </option>
              ))}
            </select>
          </label>
        ) : (
          <span className="text-ink-500 dark:text-ink-300">nurse {tile.nurse?.name ?? 'unassigned'}</span>
        )}
        {assignError && (
          <p role="alert" className="text-coral-700">
            {assignError}
          </p>
        )}
      </div>
    </li>
  );
}
