/**
 * The bed chart island: the one React root the page mounts for one patient. It lays out the
 * SpO₂ chart and derived figures on top, the obs entry form (for those who may chart) and the obs
 * record below, and the target band with its history and (for intensivists) the order form.
 *
 * Data comes through SWR; the page passes the patient it already loaded on the server as
 * `initial.patient` for a first paint with data. The series and the obs record poll every 15 s,
 * so an obs charted by someone else appears without a reload; any write revalidates every key of
 * the patient (`chartKeys(patientId).matches`).
 */
import { useEffect, useMemo, useState } from 'react';
import {
  DEFAULT_WINDOW_HOURS,
  type ObsPage,
  type ObsView,
  type PatientDetail,
  type SeriesResponse,
  type WindowHours,
} from '~/lib/charting/api-types.ts';
import { DEVICE_LABELS } from '~/lib/charting/obs-input.ts';
import { formatDayTime } from '~/lib/time/format.ts';
import { ApiClientError, fetchJson } from '~/lib/client/fetch-json.ts';
import { usePolled } from '~/lib/client/use-polled.ts';
import DerivedFigures from './DerivedFigures.tsx';
import ObsEntryForm from './ObsEntryForm.tsx';
import ObsRecordTable from './ObsRecordTable.tsx';
import SaturationChart, { type ExtraSpo2Mark } from './SaturationChart.tsx';
import TargetOrderPanel from './TargetOrderPanel.tsx';
import { GasBias } from './BloodGasPanel.tsx';
import { POLL_MS, chartKeys, fmtFio2, useRefreshChart } from './chart-shared.tsx';
import { errorText } from '~/lib/client/use-form.ts';

export interface BedChartPageProps {
  patientId: number;
  initial?: { patient?: PatientDetail };
  /** Fixed chart size (tests; print). Default: fills its column. */
  chartSize?: { width: number; height: number };
  /** The signed-in user's name, for the printed header. */
  printedBy?: string;
}

const PATIENT_POLL_MS = 30_000;

export default function BedChartPage({ patientId, initial, chartSize, printedBy }: BedChartPageProps) {
  const keys = chartKeys(patientId);
  const [hours, setHours] = useState<WindowHours>(DEFAULT_WINDOW_HOURS);
  const refresh = useRefreshChart(patientId);
  const patientQ = usePolled<PatientDetail>(keys.patient, PATIENT_POLL_MS, { fallbackData: initial?.patient });
  const seriesQ = usePolled<SeriesResponse>(keys.series(hours), POLL_MS);
  const patient = patientQ.data;
  // Arterial blood gases: their measured SaO₂ as diamonds on the SpO₂ panel (ringed when occult hypoxaemia).
  const gasMarks = useMemo(() => ({ name: 'SaO₂ (blood gas)', marks: gasMarksOf(seriesQ.data) }), [seriesQ.data]);
  // Opened to chart obs (from the board, `#chart-obs`): the SpO₂ field has focus once the island is live.
  // biome-ignore lint/correctness/useExhaustiveDependencies: run once, when the patient first arrives
  useEffect(() => {
    if (window.location.hash === '#chart-obs')
      document.querySelector<HTMLElement>('#chart-obs input[name="spo2"]')?.focus();
  }, [patient !== undefined]);

  if (!patient) {
    if (patientQ.error) {
      const e = patientQ.error;
      const words =
        e instanceof ApiClientError && e.status === 404
          ? 'No such patient.'
          : e instanceof ApiClientError && e.status === 403
            ? 'You may not see this patient’s chart.'
            : `Could not load the patient: ${errorText(e)}`;
      return (
        <p role="alert" className="panel">
          {words}
        </p>
      );
    }
    return <p className="panel">Loading the bed chart…</p>;
  }

  const tz = patient.timeZone;
  const band = patient.band;

  return (
    <div className="space-y-4" data-testid="bed-chart">
      <PrintHeader patient={patient} hours={hours} printedBy={printedBy} />
      <header className="flex flex-wrap items-baseline gap-x-4 gap-y-1 print:hidden">
        <h2 className="text-xl font-bold">
          {patient.bed ? `${patient.bed.label} · ` : ''}
          {patient.label}
        </h2>
        <p className="text-sm text-ink-600 dark:text-ink-300">
          {patient.bed ? patient.bed.unitName : 'Discharged — the chart can be read, not added to'}
          {band && (
            <>
              {' '}
              · band{' '}
              <strong>
                {band.low}–{band.high} %
              </strong>{' '}
              (NEWS2 Scale {band.news2Scale})
            </>
          )}
          {!band && (
            <>
              {' '}
              · <strong>no band ordered</strong>
            </>
          )}
          {patient.co2RetentionRisk && <> · at risk of CO₂ retention</>}
        </p>
        <GasBias patientId={patientId} />
        {patient.lastCharted && (
          <p className="text-sm text-ink-600 dark:text-ink-300">
            Last charted obs {formatDayTime(patient.lastCharted.takenAt, tz)}
          </p>
        )}
        {patientQ.error && (
          <p role="alert" className="text-sm text-coral-800 dark:text-coral-200">
            Could not refresh the patient: {errorText(patientQ.error)}
          </p>
        )}
      </header>

      {/* First screen at a desk: chart | figures and the band (with its order form) | obs entry. */}
      <div
        className={`grid gap-4 ${patient.can.chart ? 'xl:grid-cols-[minmax(0,1fr)_20rem_19rem]' : 'xl:grid-cols-[minmax(0,1fr)_22rem]'} print:block`}
      >
        <div className="panel min-w-0 print:mb-2">
          <SaturationChart
            series={seriesQ.data}
            timeZone={tz}
            hours={hours}
            onHoursChange={setHours}
            error={seriesQ.error}
            size={chartSize}
            extraMarks={gasMarks}
          />
        </div>
        <div className="min-w-0 space-y-4">
          <div className="panel min-w-0">
            <DerivedFigures derived={seriesQ.data?.derived} timeZone={tz} />
          </div>
          <div className="panel min-w-0 print:hidden" id="band-panel">
            <TargetOrderPanel
              patientId={patientId}
              timeZone={tz}
              canOrder={patient.can.order}
              initialOrders={patient.orders}
              co2RetentionRisk={patient.co2RetentionRisk}
            />
          </div>
        </div>
        {patient.can.chart && (
          <div className="panel min-w-0 self-start print:hidden" id="chart-obs">
            <ObsEntryForm
              key={patient.id}
              patientId={patientId}
              lastCharted={patient.lastCharted}
              timeZone={tz}
              onSaved={() => void refresh()}
            />
          </div>
        )}
      </div>

      <div className="panel min-w-0 print:hidden">
        <ObsRecordTable
          patientId={patientId}
          timeZone={tz}
          canChart={patient.can.chart}
          orders={patient.orders}
          lastCharted={patient.lastCharted}
        />
      </div>
      <PrintObsRecord patientId={patientId} timeZone={tz} from={seriesQ.data?.from ?? null} />
    </div>
  );
}

/** Print only: who, where, which band, and when and by whom it was printed. */
function PrintHeader({
  patient,
  hours,
  printedBy,
}: {
  patient: PatientDetail;
  hours: WindowHours;
  printedBy?: string;
}) {
  const [at, setAt] = useState(() => Date.now());
  useEffect(() => {
    const update = () => setAt(Date.now());
    window.addEventListener('beforeprint', update);
    return () => window.removeEventListener('beforeprint', update);
  }, []);
  const band = patient.band;
  return (
    <div className="hidden border-b border-ink-300 pb-2 print:block" data-testid="print-header">
      <p className="text-lg font-bold">
        {patient.familyName}, {patient.givenName} · {patient.label} · MRN {patient.mrn}
      </p>
      <p>
        {patient.bed ? `${patient.bed.unitName}, bed ${patient.bed.label}` : 'Discharged'} · band{' '}
        {band ? `${band.low}–${band.high} % (NEWS2 Scale ${band.news2Scale})` : 'not ordered'} · chart window {hours} h
      </p>
      <p>
        Printed {formatDayTime(at, patient.timeZone)} ({patient.timeZone}){printedBy ? ` by ${printedBy}` : ''} ·
        decision support only; follow local protocols
      </p>
    </div>
  );
}

/** Print only: every charted obs of the chart's window (all statuses), not one page of it. */
function PrintObsRecord({ patientId, timeZone, from }: { patientId: number; timeZone: string; from: number | null }) {
  const key =
    from === null
      ? null
      : `/api/patients/${patientId}/observations?page=1&pageSize=200&print=${Math.floor(from / 60_000)}`;
  const q = usePolled<ObsView[]>(key, POLL_MS, {
    fetcher: async () => {
      const items: ObsView[] = [];
      for (let page = 1; page <= 20; page++) {
        const res = await fetchJson<ObsPage>(`/api/patients/${patientId}/observations?page=${page}&pageSize=200`);
        items.push(...res.items);
        const oldest = res.items[res.items.length - 1];
        if (items.length >= res.total || !oldest || new Date(oldest.takenAt).getTime() < from!) break;
      }
      return items.filter((o) => new Date(o.takenAt).getTime() >= from!);
    },
  });
  const rows = q.data ?? [];
  return (
    <section className="hidden print:block" data-testid="print-record" aria-label="Charted obs of the chart window">
      <h2 className="mt-2 font-bold">Charted obs in the window ({rows.length})</h2>
      <table className="w-full border-collapse text-left">
        <thead>
          <tr>
            {['Time', 'SpO₂ %', 'HR', 'RR', 'FiO₂', 'Device', 'Trace', 'BP', 'Temp', 'AVPU', 'Status'].map((h) => (
              <th key={h} className="border-b border-ink-300 pr-1">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.map((o) => (
            <tr key={o.id} className={o.status === 'current' ? '' : 'line-through'}>
              <td className="pr-1">{formatDayTime(o.takenAt, timeZone)}</td>
              <td>{o.spo2 ?? '—'}</td>
              <td>{o.heartRate ?? '—'}</td>
              <td>{o.respRate ?? '—'}</td>
              <td>{o.fio2 === null ? '—' : `${fmtFio2(o.fio2)}${o.fio2Estimated ? ' est.' : ''}`}</td>
              <td>
                {o.device ? DEVICE_LABELS[o.device] : '—'}
                {o.flowLpm !== null && o.device !== 'room_air' ? ` ${o.flowLpm} L/min` : ''}
              </td>
              <td>{o.trace}</td>
              <td>{o.systolic ?? '—'}</td>
              <td>{o.temperature ?? '—'}</td>
              <td>{o.consciousness ?? '—'}</td>
              <td>{o.status === 'current' ? '' : o.status.replace(/_/g, ' ')}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}

/** The series' arterial gases as SpO₂-panel marks (SaO₂ is measured, so only arterial samples). */
export function gasMarksOf(series: SeriesResponse | undefined): ExtraSpo2Mark[] {
  return (series?.bloodGases ?? [])
    .filter((g) => g.sampleType === 'arterial')
    .map((g) => ({
      key: g.id,
      t: g.t,
      v: g.sao2,
      label: `SaO₂ ${g.sao2} %${g.spo2AtSample !== null ? ` (SpO₂ ${g.spo2AtSample} %)` : ''}${g.occult ? ' — occult hypoxaemia' : ''}`,
      ...(g.occult ? { flag: 'occult hypoxaemia' } : {}),
    }));
}
