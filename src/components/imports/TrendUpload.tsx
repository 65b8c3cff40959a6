import { useEffect, useMemo, useState } from 'react';
import useSWR from 'swr';
import { ApiClientError, fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';
import FormButtons from '~/components/FormButtons.tsx';
import { useRefreshChart } from '~/components/chart/chart-shared.tsx';
import {
  MAX_TREND_FILE_BYTES,
  guessMapping,
  headerNames,
  mappingFits,
  trendMappingSchema,
  type TimeMode,
  type TrendMapping,
} from '~/lib/imports/mapping.ts';
import type { ImportView, TrendPreview } from '~/lib/imports/api-types.ts';
import { uploadFile } from '~/lib/client/upload-xhr.ts';
import { formatCount, formatDateTimeSeconds } from '~/lib/time/format.ts';

interface Props {
  patientId: number;
  canChart: boolean;
}
interface ImportsResponse {
  imports: ImportView[];
  mapping: TrendMapping | null;
  timeZone: string;
}
type Draft = {
  time: string;
  spo2: string;
  heartRate: string;
  perfusionIndex: string;
  quality: string;
  timeMode: TimeMode;
};

const EMPTY_DRAFT: Draft = { time: '', spo2: '', heartRate: '', perfusionIndex: '', quality: '', timeMode: 'local' };

function when(iso: string | null, timeZone: string): string {
  if (!iso) return '—';
  return formatDateTimeSeconds(iso, timeZone);
}

function Progress({ label, fraction }: { label: string; fraction: number }) {
  const pct = Math.round(fraction * 100);
  return (
    <div className="my-2" data-testid="upload-progress">
      <label className="text-sm">
        {label} {pct} %
        <progress className="ml-2 h-2 w-64 align-middle accent-glass-600" max={100} value={pct}>
          {pct} %
        </progress>
      </label>
    </div>
  );
}

/** Monitor trend file upload on the bed chart: choose columns, preview, commit as one import; withdraw an import. */
export default function TrendUpload({ patientId, canChart }: Props) {
  const listKey = `/api/patients/${patientId}/imports`;
  const { data, error, mutate } = useSWR<ImportsResponse>(listKey, fetchJson);
  const [file, setFile] = useState<File | null>(null);
  const [headers, setHeaders] = useState<string[]>([]);
  const [draft, setDraft] = useState<Draft>(EMPTY_DRAFT);
  const [preview, setPreview] = useState<TrendPreview | null>(null);
  const [progress, setProgress] = useState<{ label: string; fraction: number } | null>(null);
  // Refusals of a file name lines and columns ("line 12", "spo2"): kept as the server sent them.
  const { errors: refusals, setErrors: setRefusals, alert, setAlert, status, setStatus, submit } = useForm();
  const refreshChart = useRefreshChart(patientId);
  const clearMessages = () => {
    setAlert(null);
    setStatus('');
    setRefusals({});
  };
  const [withdrawing, setWithdrawing] = useState<number | null>(null);
  const [reason, setReason] = useState('');
  const timeZone = data?.timeZone ?? 'UTC';

  // biome-ignore lint/correctness/useExhaustiveDependencies: a changed mapping or file makes the preview stale
  useEffect(() => {
    setPreview(null);
  }, [draft, file]);

  async function chooseFile(f: File | null) {
    clearMessages();
    setFile(f);
    setHeaders([]);
    if (!f) return;
    if (f.size > MAX_TREND_FILE_BYTES) {
      setAlert(`This file is ${(f.size / 1024 / 1024).toFixed(1)} MB; the limit is 20 MB.`);
      setFile(null);
      return;
    }
    const head = await f.slice(0, 64 * 1024).text();
    const names = headerNames(head);
    setHeaders(names);
    const remembered = data?.mapping;
    const firstTime = head.split(/\r?\n/)[1] ?? '';
    const base =
      remembered && mappingFits(remembered, names)
        ? remembered
        : { ...guessMapping(names), timeMode: /(Z|[+-]\d{2}:?\d{2})\s*(,|;|\t|$)/i.test(firstTime) ? 'iso' : 'local' };
    setDraft({
      time: base.time ?? '',
      spo2: base.spo2 ?? '',
      heartRate: base.heartRate ?? '',
      perfusionIndex: base.perfusionIndex ?? '',
      quality: base.quality ?? '',
      timeMode: (base.timeMode as TimeMode) ?? 'local',
    });
  }

  const mappingCheck = useMemo(() => trendMappingSchema.safeParse(draft), [draft]);

  function uploadUrl(step: 'preview' | 'commit', expectHash?: string) {
    const q = new URLSearchParams({ ...draft, fileName: file!.name, ...(expectHash ? { expectHash } : {}) });
    return `/api/patients/${patientId}/imports/${step}?${q}`;
  }

  async function run<T>(label: string, url: string): Promise<T | null> {
    clearMessages();
    setProgress({ label, fraction: 0 });
    const answer = await submit(() => uploadFile<T>(url, file!, (fraction) => setProgress({ label, fraction })), {
      onRefused: (_fields, err) => setRefusals(err instanceof ApiClientError ? err.fields : {}),
    });
    setProgress(null);
    return answer ?? null;
  }

  async function doPreview() {
    const res = await run<{ preview: TrendPreview }>('Uploading for preview', uploadUrl('preview'));
    if (res) setPreview(res.preview);
  }

  /** Leaves an unfit optional column out of the mapping; the preview must then be run again. */
  function unmap(field: 'perfusionIndex' | 'quality', column: string) {
    setDraft((d) => ({ ...d, [field]: '' }));
    clearMessages();
    setStatus(`Column "${column}" is now left unmapped. Preview again to see what would be stored.`);
  }

  async function doCommit() {
    if (!preview) return;
    const res = await run<{ import: ImportView }>('Uploading to store', uploadUrl('commit', preview.fileHash));
    if (!res) return;
    setStatus(
      `Stored ${formatCount(res.import.rowsStored)} readings from ${res.import.fileName} as import ${res.import.id}.`,
    );
    setPreview(null);
    setFile(null);
    setHeaders([]);
    await mutate();
    await refreshChart(); // every view of this patient (the chart island too) refetches
  }

  async function withdraw(id: number) {
    clearMessages();
    if ((await submit(() => postJson(`/api/imports/${id}/withdraw`, { reason }))) === undefined) return;
    setStatus(`Import ${id} withdrawn: its readings stay in the record, marked withdrawn, and leave the chart.`);
    setWithdrawing(null);
    setReason('');
    await mutate();
    await refreshChart();
  }

  const select = (key: keyof Draft, label: string, optional = false) => (
    <label className="block text-sm">
      <span className="font-bold">{label}</span>
      <select
        className="field mt-1"
        value={draft[key]}
        onChange={(e) => setDraft({ ...draft, [key]: e.target.value })}
        aria-label={`${label} column`}
      >
        <option value="">{optional ? 'none in this file' : 'choose…'}</option>
        {headers.map((h) => (
          <option key={h} value={h}>
            {h}
          </option>
        ))}
      </select>
      {!mappingCheck.success &&
        mappingCheck.error.issues
          .filter((i) => i.path[0] === key && draft[key] !== '')
          .map((i) => (
            <span key={i.message} className="text-xs text-coral-700 dark:text-coral-300">
              {i.message}
            </span>
          ))}
    </label>
  );

  return (
    <section className="panel mt-4" aria-labelledby="trend-upload-title" data-testid="trend-upload">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="trend-upload-title" className="text-lg font-bold">
          Monitor trend files
        </h2>
        <a className="text-sm underline" href={`/pleth?patient=${patientId}`}>
          Check a pleth strip for this patient
        </a>
      </div>
      <p className="mb-3 text-sm text-ink-600 dark:text-ink-300">
        CSV exported from a bedside monitor, with a header row: time, SpO₂, heart rate, and if present perfusion index
        and trace quality (clean, weak, noisy or absent). Up to 20 MB. Nothing is stored until you commit.
      </p>

      {alert && (
        <div
          role="alert"
          data-testid="upload-message"
          className="mb-3 rounded-md border border-coral-300 bg-coral-50 p-2 text-sm text-coral-800 dark:border-coral-700 dark:bg-coral-900/30 dark:text-coral-200"
        >
          {alert}
          {Object.keys(refusals).length > 0 && (
            <ul className="ml-4 list-disc">
              {Object.entries(refusals).map(([k, v]) => (
                <li key={k}>
                  {k}: {v}
                </li>
              ))}
            </ul>
          )}
        </div>
      )}
      {!alert && status && (
        <div
          role="status"
          data-testid="upload-message"
          className="mb-3 rounded-md bg-glass-50 p-2 text-sm dark:bg-glass-900/40"
        >
          {status}
        </div>
      )}

      {canChart && (
        <div className="space-y-3">
          <label className="block text-sm font-bold">
            Trend file
            <input
              type="file"
              accept=".csv,text/csv"
              className="field mt-1"
              data-testid="trend-file"
              onChange={(e) => chooseFile(e.target.files?.[0] ?? null)}
            />
          </label>
          {file && headers.length > 0 && (
            <fieldset className="rounded-md border border-ink-200 p-3 dark:border-ink-700">
              <legend className="px-1 text-sm font-bold">Columns in {file.name}</legend>
              <div className="grid gap-3 sm:grid-cols-3 lg:grid-cols-5">
                {select('time', 'Time')}
                {select('spo2', 'SpO₂')}
                {select('heartRate', 'Heart rate')}
                {select('perfusionIndex', 'Perfusion index', true)}
                {select('quality', 'Trace quality', true)}
              </div>
              <div className="mt-3 flex flex-wrap gap-4 text-sm" role="radiogroup" aria-label="How times are written">
                <label className="inline-flex items-center gap-1">
                  <input
                    type="radio"
                    name="timeMode"
                    checked={draft.timeMode === 'local'}
                    onChange={() => setDraft({ ...draft, timeMode: 'local' })}
                  />
                  Unit local time ({timeZone})
                </label>
                <label className="inline-flex items-center gap-1">
                  <input
                    type="radio"
                    name="timeMode"
                    checked={draft.timeMode === 'iso'}
                    onChange={() => setDraft({ ...draft, timeMode: 'iso' })}
                  />
                  ISO 8601 with offset (e.g. 2026-12-02T09:15:00Z)
                </label>
              </div>
              <p className="mt-2 text-xs text-ink-500 dark:text-ink-400">
                The columns chosen here are remembered for your unit's next upload.
              </p>
              <button
                type="button"
                className="btn-primary mt-3"
                disabled={!mappingCheck.success || progress !== null}
                onClick={doPreview}
              >
                Preview
              </button>
            </fieldset>
          )}
          {progress && <Progress label={progress.label} fraction={progress.fraction} />}
          {preview && (
            <PreviewPanel
              preview={preview}
              timeZone={timeZone}
              busy={progress !== null}
              onCommit={doCommit}
              onUnmap={unmap}
            />
          )}
        </div>
      )}

      <h3 className="mt-5 font-bold">Imports for this patient</h3>
      {error && <p role="alert">Could not load imports: {String((error as Error).message)}</p>}
      {data && data.imports.length === 0 && <p className="text-sm text-ink-500">None yet.</p>}
      {data && data.imports.length > 0 && (
        <table className="stack-table mt-2 w-full text-sm" data-testid="import-list">
          <thead>
            <tr className="text-left text-ink-500">
              <th className="py-1">File</th>
              <th>Readings</th>
              <th>Span</th>
              <th>Committed</th>
              <th>State</th>
              <th>
                <span className="sr-only">Actions</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {data.imports.map((imp) => (
              <tr key={imp.id} className="border-t border-ink-100 align-top dark:border-ink-800">
                <td data-label="File" className="py-1.5">
                  {imp.fileName}
                  <br />
                  <span className="font-mono text-xs text-ink-500">{imp.fileHash.slice(0, 12)}…</span>
                </td>
                <td data-label="Readings">
                  {formatCount(imp.rowsStored)} stored{imp.rowsSkipped ? `, ${imp.rowsSkipped} skipped` : ''}
                  {imp.rowsRefused ? `, ${imp.rowsRefused} refused` : ''}
                </td>
                <td data-label="Span">
                  {when(imp.firstAt, timeZone)} – {when(imp.lastAt, timeZone)}
                </td>
                <td data-label="Committed">
                  {when(imp.committedAt, timeZone)} by {imp.committedBy}
                </td>
                <td data-label="State">
                  {imp.withdrawnAt ? (
                    <span
                      className={imp.withdrawnAt ? 'line-through decoration-1' : ''}
                      title={imp.withdrawReason ?? ''}
                    >
                      withdrawn {when(imp.withdrawnAt, timeZone)} by {imp.withdrawnBy}: {imp.withdrawReason}
                    </span>
                  ) : (
                    'standing'
                  )}
                </td>
                <td>
                  {canChart && !imp.withdrawnAt && withdrawing !== imp.id && (
                    <button
                      type="button"
                      className="btn-quiet"
                      onClick={() => {
                        setWithdrawing(imp.id);
                        setReason('');
                      }}
                    >
                      Withdraw
                    </button>
                  )}
                  {withdrawing === imp.id && (
                    <form
                      className="flex flex-col gap-1"
                      onSubmit={(e) => {
                        e.preventDefault();
                        void withdraw(imp.id);
                      }}
                    >
                      <label className="text-xs">
                        Reason
                        <input
                          className="field"
                          value={reason}
                          onChange={(e) => setReason(e.target.value)}
                          required
                          minLength={3}
                          maxLength={400}
                        />
                      </label>
                      <FormButtons
                        action="Withdraw import"
                        cancel="Keep"
                        onCancel={() => setWithdrawing(null)}
                        className="flex gap-1"
                      />
                    </form>
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </section>
  );
}

const FIELD_WORDS: Record<string, string> = {
  time: 'time',
  spo2: 'SpO₂',
  heartRate: 'heart rate',
  perfusionIndex: 'perfusion index',
  quality: 'trace quality',
};

function PreviewPanel({
  preview,
  timeZone,
  busy,
  onCommit,
  onUnmap,
}: {
  preview: TrendPreview;
  timeZone: string;
  busy: boolean;
  onCommit: () => void;
  onUnmap: (field: 'perfusionIndex' | 'quality', column: string) => void;
}) {
  const n = formatCount;
  const blocked = preview.alreadyImported !== null || preview.toStore === 0;
  return (
    <div className="rounded-md border border-ink-200 p-3 dark:border-ink-700" data-testid="trend-preview">
      <h3 className="font-bold">Preview of {preview.fileName}</h3>
      <dl className="mt-2 grid grid-cols-2 gap-x-4 gap-y-1 text-sm sm:grid-cols-4">
        <dt className="text-ink-500">Rows in file</dt>
        <dd data-testid="preview-rows">{n(preview.rowCount)}</dd>
        <dt className="text-ink-500">Time span</dt>
        <dd data-testid="preview-span">
          {preview.span ? `${when(preview.span.first, timeZone)} – ${when(preview.span.last, timeZone)}` : '—'}
        </dd>
        <dt className="text-ink-500">Will be stored</dt>
        <dd data-testid="preview-to-store">
          <strong>{n(preview.toStore)}</strong>
        </dd>
        <dt className="text-ink-500">Outside the admission</dt>
        <dd data-testid="preview-outside">{n(preview.outsideAdmission.count)} (not stored)</dd>
        <dt className="text-ink-500">Same second as a stored reading</dt>
        <dd data-testid="preview-overlap">{n(preview.overlapping.count)} (not stored)</dd>
        <dt className="text-ink-500">Refused rows</dt>
        <dd data-testid="preview-refused">{n(preview.refused.count)}</dd>
      </dl>
      {preview.alreadyImported && (
        <p role="alert" className="mt-2 text-sm text-coral-800 dark:text-coral-200">
          This file was already imported{preview.alreadyImported.samePatient ? '' : ' to another patient'} (import{' '}
          {preview.alreadyImported.importId}, {when(preview.alreadyImported.committedAt, timeZone)} by{' '}
          {preview.alreadyImported.committedBy}).
        </p>
      )}
      {preview.notes.length > 0 && (
        <ul className="mt-2 text-sm text-iris-800 dark:text-iris-200">
          {preview.notes.map((x) => (
            <li key={x.line}>
              Line {x.line}: {x.reason}
            </li>
          ))}
        </ul>
      )}
      {(preview.outsideAdmission.count > 0 || preview.overlapping.count > 0) && (
        <details className="mt-2 text-sm">
          <summary>Lines not stored ({n(preview.outsideAdmission.count + preview.overlapping.count)})</summary>
          <ul className="ml-4 list-disc">
            {preview.outsideAdmission.examples.map((x) => (
              <li key={`o${x.line}`}>
                Line {x.line}: {when(x.at, timeZone)} is outside the admission
              </li>
            ))}
            {preview.overlapping.examples.map((x) => (
              <li key={`d${x.line}`}>
                Line {x.line}: {when(x.at, timeZone)} already has a reading
              </li>
            ))}
          </ul>
        </details>
      )}
      {preview.unfitColumns.map((u) => (
        <div
          key={u.field}
          role="alert"
          className="mt-2 rounded-md border border-coral-300 bg-coral-50 p-2 text-sm text-coral-900 dark:bg-coral-900/30 dark:text-coral-100"
          data-testid="unfit-column"
        >
          Column <strong>“{u.column}”</strong>, mapped as {FIELD_WORDS[u.field]}, does not fit: {n(u.refused)} of{' '}
          {n(preview.rowCount)} rows were refused for its values
          {u.examples.length ? <> (such as {u.examples.map((x) => `“${x}”`).join(', ')})</> : null}.{' '}
          {u.canUnmap ? (
            <button
              type="button"
              className="btn-quiet ml-1"
              onClick={() => onUnmap(u.field as 'perfusionIndex' | 'quality', u.column)}
            >
              Leave “{u.column}” unmapped
            </button>
          ) : (
            <>Choose another column for {FIELD_WORDS[u.field]}.</>
          )}
        </div>
      ))}
      {preview.refused.count > 0 && (
        <table className="stack-table mt-2 w-full text-sm" data-testid="refused-groups">
          <caption className="text-left font-bold">Refused rows by reason ({n(preview.refused.count)})</caption>
          <thead>
            <tr className="text-left text-ink-500">
              <th>Reason</th>
              <th className="w-20 text-right">Rows</th>
              <th className="pl-4">First lines</th>
            </tr>
          </thead>
          <tbody>
            {preview.refused.groups.map((g) => (
              <tr key={g.reason} className="border-t border-ink-100 dark:border-ink-800">
                <td data-label="Reason">{g.reason}</td>
                <td data-label="Rows" className="text-right tabular-nums">
                  {n(g.count)}
                </td>
                <td data-label="First lines" className="pl-4">
                  {g.firstLines.join(', ')}
                  {g.count > g.firstLines.length ? ', …' : ''}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {preview.refused.count > 0 && (
        <details className="mt-1 text-sm">
          <summary>
            Each refused line
            {preview.refused.count > preview.refused.rows.length
              ? ` (first ${preview.refused.rows.length} of ${n(preview.refused.count)})`
              : ''}
          </summary>
          <table className="mt-1 w-full text-sm" data-testid="refused-rows">
            <thead>
              <tr className="text-left text-ink-500">
                <th className="w-20">Line</th>
                <th>Reason</th>
              </tr>
            </thead>
            <tbody>
              {preview.refused.rows.map((r) => (
                <tr key={r.line} className="border-t border-ink-100 dark:border-ink-800">
                  <td>{r.line}</td>
                  <td>{r.reason}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </details>
      )}
      <button type="button" className="btn-primary mt-3" disabled={blocked || busy} onClick={onCommit}>
        Commit {n(preview.toStore)} readings
      </button>
    </div>
  );
}
