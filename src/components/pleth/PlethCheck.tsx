import { useMemo, useState } from 'react';
import useSWR from 'swr';
import { CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';
import type { PatientSummary } from '~/lib/charting/api-types.ts';
import type { StripResult } from '~/lib/pleth-strips/api-types.ts';
import { uploadFile } from '~/lib/client/upload-xhr.ts';
import { formatCount, formatDayTime } from '~/lib/time/format.ts';

interface Props {
  patientId: number | null;
}
interface Loaded {
  name: string;
  text: string;
  result: StripResult;
}
interface ChecksResponse {
  timeZone: string;
  checks: {
    id: number;
    fileName: string;
    verdict: string;
    summary: string;
    spo2: number | null;
    heartRate: number | null;
    perfusionIndex: number | null;
    reasons: string[];
    note: string | null;
    checkedAt: string;
    checkedBy: string;
    reading: { takenAt: string; spo2: number | null } | null;
  }[];
  readings: { id: number; takenAt: string; source: string; spo2: number | null; trace: string }[];
}

const EXAMPLES = [
  { file: 'clean', label: 'Clean trace' },
  { file: 'motion', label: 'Hand moving' },
  { file: 'low-perfusion', label: 'Cold hands, weak pulse' },
];

const VERDICT_STYLE: Record<string, { box: string; mark: string; word: string }> = {
  trustworthy: {
    box: 'border-glass-500 bg-glass-50 text-glass-900 dark:bg-glass-900/40 dark:text-glass-100',
    mark: '●',
    word: 'Trustworthy',
  },
  doubtful: {
    box: 'border-iris-500 bg-iris-50 text-iris-900 dark:bg-iris-900/40 dark:text-iris-100',
    mark: '◐',
    word: 'Doubtful',
  },
  unusable: {
    box: 'border-coral-500 bg-coral-50 text-coral-900 dark:bg-coral-900/40 dark:text-coral-100',
    mark: '○',
    word: 'Unusable',
  },
};

const fmt = (v: number | null | undefined, dp: number, unit = '') =>
  v === null || v === undefined ? '—' : `${v.toFixed(dp)}${unit}`;

/** Pleth strip check: what the computation module finds in a raw red / infrared / dark strip, and attaching it to a record. */
export default function PlethCheck({ patientId: initialPatient }: Props) {
  const [loaded, setLoaded] = useState<Loaded | null>(null);
  const [busy, setBusy] = useState<number | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [sampleRate, setSampleRate] = useState('');

  async function analyse(name: string, text: string) {
    setProblem(null);
    setBusy(0);
    try {
      const q = new URLSearchParams({ fileName: name, ...(sampleRate ? { sampleRateHz: sampleRate } : {}) });
      const result = await uploadFile<StripResult>(
        `/api/pleth/analyse?${q}`,
        new Blob([text], { type: 'text/csv' }),
        (f) => setBusy(f),
      );
      setLoaded({ name, text, result });
    } catch (err) {
      setLoaded(null);
      setProblem((err as Error).message);
    } finally {
      setBusy(null);
    }
  }

  async function example(file: string) {
    const res = await fetch(`/strips/${file}.csv`);
    if (!res.ok) {
      setProblem(`Could not load the example strip (${res.status}).`);
      return;
    }
    await analyse(`${file}.csv`, await res.text());
  }

  return (
    <div className="space-y-4">
      <section className="panel" aria-labelledby="strip-pick">
        <h2 id="strip-pick" className="text-lg font-bold">
          Strip
        </h2>
        <p className="mb-3 text-sm text-ink-600 dark:text-ink-300">
          CSV with a header: <code>time</code> in seconds (or <code>sample</code> with the sample rate below),{' '}
          <code>red</code>, <code>infrared</code>, <code>dark</code> as raw detector counts.
        </p>
        <div className="flex flex-wrap items-end gap-3">
          <label className="text-sm font-bold">
            Upload a strip
            <input
              type="file"
              accept=".csv,text/csv"
              className="field mt-1"
              data-testid="strip-file"
              onChange={async (e) => {
                const f = e.target.files?.[0];
                if (f) await analyse(f.name, await f.text());
              }}
            />
          </label>
          <label className="text-sm font-bold">
            Sample rate (Hz, for sample-index strips)
            <input
              className="field mt-1 w-28"
              inputMode="decimal"
              value={sampleRate}
              onChange={(e) => setSampleRate(e.target.value)}
            />
          </label>
        </div>
        <div className="mt-3 flex flex-wrap gap-2" role="group" aria-label="Example strips">
          <span className="self-center text-sm text-ink-500">Or try an invented example:</span>
          {EXAMPLES.map((x) => (
            <button key={x.file} type="button" className="btn-quiet" onClick={() => example(x.file)}>
              {x.label}
            </button>
          ))}
        </div>
        {busy !== null && (
          <p className="mt-2 text-sm" aria-live="polite">
            Checking the strip… {Math.round(busy * 100)} %
          </p>
        )}
        {problem && (
          <p
            role="alert"
            className="mt-2 rounded-md border border-coral-300 bg-coral-50 p-2 text-sm text-coral-800 dark:bg-coral-900/30 dark:text-coral-200"
            data-testid="strip-problem"
          >
            {problem}
          </p>
        )}
      </section>

      {loaded && <Findings loaded={loaded} />}
      {loaded && <Attach loaded={loaded} initialPatient={initialPatient} sampleRate={sampleRate} />}
    </div>
  );
}

function Findings({ loaded }: { loaded: Loaded }) {
  const { result, name } = loaded;
  const a = result.analysis;
  const style = VERDICT_STYLE[a.verdict]!;
  const points = useMemo(
    () => result.wave.t.map((t, i) => ({ t, red: result.wave.red[i], infrared: result.wave.infrared[i] })),
    [result],
  );
  const clean = a.beats.filter((b) => !b.motion).length;
  return (
    <>
      <section
        className={`rounded-lg border-2 p-4 ${style.box}`}
        aria-labelledby="verdict-title"
        data-testid="pleth-verdict"
        data-verdict={a.verdict}
      >
        <h2 id="verdict-title" className="text-xl font-bold">
          <span aria-hidden="true">{style.mark}</span> {style.word}{' '}
          <span className="text-sm font-normal">— {name}</span>
        </h2>
        {a.reasons.length > 0 ? (
          <ul className="ml-5 mt-1 list-disc" data-testid="pleth-reasons">
            {a.reasons.map((r) => (
              <li key={r}>{r}</li>
            ))}
          </ul>
        ) : (
          <p className="mt-1">No reason found to doubt this strip.</p>
        )}
        {a.notes.map((n) => (
          <p key={n} className="mt-1 text-sm">
            {n}
          </p>
        ))}
      </section>

      <section className="panel" aria-labelledby="figures-title">
        <h2 id="figures-title" className="mb-2 text-lg font-bold">
          What the check found
        </h2>
        <dl className="grid grid-cols-2 gap-x-6 gap-y-2 sm:grid-cols-3 lg:grid-cols-6" data-testid="pleth-figures">
          <div>
            <dt className="text-sm text-ink-500">SpO₂ from the curve</dt>
            <dd className="text-2xl font-bold">{fmt(a.spo2, 1, ' %')}</dd>
          </div>
          <div>
            <dt className="text-sm text-ink-500">Heart rate</dt>
            <dd className="text-2xl font-bold">{fmt(a.heartRate, 0, '/min')}</dd>
          </div>
          <div>
            <dt className="text-sm text-ink-500">Perfusion index</dt>
            <dd className="text-2xl font-bold">{fmt(a.perfusionIndex, 2, ' %')}</dd>
          </div>
          <div>
            <dt className="text-sm text-ink-500">Quality index (skewness)</dt>
            <dd className="text-2xl font-bold">{fmt(a.skewness, 2)}</dd>
          </div>
          <div>
            <dt className="text-sm text-ink-500">R (median)</dt>
            <dd className="text-2xl font-bold">{fmt(a.rMedian, 3)}</dd>
          </div>
          <div>
            <dt className="text-sm text-ink-500">Beats</dt>
            <dd className="text-2xl font-bold">
              {clean} clean{a.beats.length > clean ? ` · ${a.beats.length - clean} in motion` : ''}
            </dd>
          </div>
        </dl>
        <ul className="mt-3 space-y-1 text-sm text-ink-700 dark:text-ink-200" data-testid="pleth-meanings">
          <li>
            <strong>R</strong> compares how much of the red light the pulse takes away with how much of the infrared:
            the lower R, the higher the saturation. An R outside what the curve covers cannot be read as a saturation —
            suspect the probe.
          </li>
          <li>
            <strong>Quality index</strong> (skewness of each pulse): a clean arterial pulse rises fast and falls slowly,
            giving a clearly positive value; near zero or negative means the shape is not a pulse — movement, a loose
            probe or light leaking in.
          </li>
          <li>
            <strong>Perfusion index</strong> is the pulsing share of the infrared light: under about 0.4 % (common
            practice) the pulse is too weak for a reliable reading — cold hands, poor circulation.
          </li>
        </ul>
        <p className="mt-2 text-xs text-ink-500">
          {formatCount(result.samples)} samples at {result.sampleRateHz} Hz ({result.durationSec.toFixed(1)} s). Curve:{' '}
          {result.curve.source}. Motion in {(a.motionFraction * 100).toFixed(0)} % of one-second windows.
        </p>
      </section>

      <section className="panel" aria-labelledby="wave-title">
        <h2 id="wave-title" className="text-lg font-bold">
          Waveforms after dark subtraction
        </h2>
        <p className="text-xs text-ink-500">
          Raw counts minus the dark channel. Vertical lines: beats found (solid: clean; dashed: in motion, left out).
        </p>
        {(['red', 'infrared'] as const).map((ch) => (
          <div key={ch} className="mt-2 h-44 w-full" data-testid={`wave-${ch}`}>
            <ResponsiveContainer width="100%" height="100%">
              <LineChart data={points} margin={{ top: 8, right: 16, bottom: 4, left: 8 }}>
                <CartesianGrid strokeOpacity={0.2} />
                <XAxis
                  dataKey="t"
                  type="number"
                  domain={['dataMin', 'dataMax']}
                  unit=" s"
                  tickCount={9}
                  fontSize={11}
                />
                <YAxis
                  domain={['auto', 'auto']}
                  fontSize={11}
                  width={56}
                  label={{ value: ch === 'red' ? 'red' : 'infrared', angle: -90, position: 'insideLeft', fontSize: 11 }}
                />
                <Tooltip formatter={(v) => Math.round(Number(v))} labelFormatter={(t) => `${String(t)} s`} />
                {a.beats.map((b) => (
                  <ReferenceLine
                    key={b.startSec}
                    x={b.startSec}
                    stroke={b.motion ? '#8057e9' : '#2e7d6e'}
                    strokeDasharray={b.motion ? '4 3' : undefined}
                    ifOverflow="hidden"
                  />
                ))}
                <Line
                  dataKey={ch}
                  dot={false}
                  isAnimationActive={false}
                  stroke={ch === 'red' ? '#c73f27' : '#344c6f'}
                  strokeWidth={1.3}
                />
              </LineChart>
            </ResponsiveContainer>
          </div>
        ))}
        <details className="mt-3 text-sm">
          <summary>R per beat ({a.beats.length})</summary>
          <table className="mt-1 text-sm" data-testid="beat-table">
            <thead>
              <tr className="text-left text-ink-500">
                <th className="pr-4">Beat at</th>
                <th className="pr-4">R</th>
                <th className="pr-4">PI %</th>
                <th>Motion</th>
              </tr>
            </thead>
            <tbody>
              {a.beats.map((b) => (
                <tr key={b.startSec}>
                  <td className="pr-4">{b.startSec.toFixed(2)} s</td>
                  <td className="pr-4">{b.r.toFixed(3)}</td>
                  <td className="pr-4">{((b.acIr / b.dcIr) * 100).toFixed(2)}</td>
                  <td>{b.motion ? 'yes — left out' : 'no'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </details>
      </section>
    </>
  );
}

function Attach({
  loaded,
  initialPatient,
  sampleRate,
}: {
  loaded: Loaded;
  initialPatient: number | null;
  sampleRate: string;
}) {
  const [patientId, setPatientId] = useState<number | null>(initialPatient);
  const patients = useSWR<{ patients: PatientSummary[] }>(initialPatient ? null : '/api/patients', fetchJson);
  const checks = useSWR<ChecksResponse>(patientId ? `/api/pleth/checks?patientId=${patientId}` : null, fetchJson);
  const [observationId, setObservationId] = useState('');
  const [note, setNote] = useState('');
  const { alert, status, setStatus, busy, submit: run } = useForm();
  // The unit's zone (from the API), never the browser's.
  const time = (iso: string) => (checks.data ? formatDayTime(iso, checks.data.timeZone) : '');

  async function attach() {
    if (!patientId) return;
    const attached = await run(() =>
      postJson('/api/pleth/checks', {
        patientId,
        observationId: observationId ? Number(observationId) : null,
        fileName: loaded.name,
        csv: loaded.text,
        ...(sampleRate ? { sampleRateHz: Number(sampleRate) } : {}),
        ...(note.trim() ? { note: note.trim() } : {}),
      }),
    );
    if (attached === undefined) return;
    setStatus(`Attached: probe trace checked: ${loaded.result.analysis.verdict}.`);
    setNote('');
    await checks.mutate();
  }

  return (
    <section className="panel" aria-labelledby="attach-title" data-testid="pleth-attach">
      <h2 id="attach-title" className="text-lg font-bold">
        Attach to a patient's record
      </h2>
      <p className="text-sm text-ink-600 dark:text-ink-300">
        Keeps the strip and this verdict as a note on the reading it checks ("probe trace checked:{' '}
        {loaded.result.analysis.verdict}").
      </p>
      {!initialPatient && (
        <label className="mt-2 block text-sm font-bold">
          Patient
          <select
            className="field mt-1"
            value={patientId ?? ''}
            onChange={(e) => setPatientId(e.target.value ? Number(e.target.value) : null)}
          >
            <option value="">choose…</option>
            {patients.data?.patients
              .filter((p) => p.bed)
              .map((p) => (
                <option key={p.id} value={p.id}>
                  {p.bed!.label} · {p.label}
                </option>
              ))}
          </select>
        </label>
      )}
      {patientId && (
        <div className="mt-2 grid gap-3 sm:grid-cols-2">
          <label className="block text-sm font-bold">
            Reading checked
            <select className="field mt-1" value={observationId} onChange={(e) => setObservationId(e.target.value)}>
              <option value="">no particular reading</option>
              {checks.data?.readings.map((r) => (
                <option key={r.id} value={r.id}>
                  {time(r.takenAt)} · SpO₂ {r.spo2} % · {r.source} · {r.trace}
                </option>
              ))}
            </select>
          </label>
          <label className="block text-sm font-bold">
            Note (optional)
            <input className="field mt-1" value={note} maxLength={500} onChange={(e) => setNote(e.target.value)} />
          </label>
          <div>
            <button type="button" className="btn-primary" onClick={attach} disabled={busy}>
              Attach to record
            </button>
          </div>
        </div>
      )}
      {status && (
        <p role="status" className="mt-2 text-sm">
          {status}
        </p>
      )}
      {alert && (
        <p role="alert" className="mt-2 text-sm">
          {alert}
        </p>
      )}
      {checks.error && (
        <p role="alert" className="mt-2 text-sm">
          {(checks.error as Error).message}
        </p>
      )}
      {checks.data && checks.data.checks.length > 0 && (
        <ul className="mt-3 space-y-1 text-sm" data-testid="attached-checks">
          {checks.data.checks.map((c) => (
            <li key={c.id}>
              <strong>{c.summary}</strong>
              {c.reading ? ` — reading of ${time(c.reading.takenAt)} (SpO₂ ${c.reading.spo2} %)` : ''}; {c.fileName},{' '}
              {time(c.checkedAt)} by {c.checkedBy}
              {c.reasons.length > 0 ? ` — ${c.reasons.join('; ')}` : ''}
              {c.note ? ` — “${c.note}”` : ''}
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
