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
import { useState } from 'react';
import useSWR from 'swr';
import type { PatientDetail, SeriesResponse } from '~/lib/charting/api-types.ts';
import { ApiClientError, fetchJson } from '~/lib/client/fetch-json.ts';
import DerivedFigures from './DerivedFigures.tsx';
import ObsEntryForm from './ObsEntryForm.tsx';
import ObsRecordTable from './ObsRecordTable.tsx';
import SaturationChart from './SaturationChart.tsx';
import TargetOrderPanel from './TargetOrderPanel.tsx';
import { GasBias } from './BloodGasPanel.tsx';
import { DEFAULT_WINDOW_HOURS, POLL_MS, chartKeys, errorText, formatDateTime, useRefreshChart, type WindowHours } from './chart-shared.tsx';

export interface BedChartPageProps {
  patientId: number;
  initial?: { patient?: PatientDetail };
  /** Fixed chart size (tests; print). Default: fills its column. */
  chartSize?: { width: number; height: number };
}

const PATIENT_POLL_MS = 30_000;

export default function BedChartPage({ patientId, initial, chartSize }: BedChartPageProps) {
  const keys = chartKeys(patientId);
  const [hours, setHours] = useState<WindowHours>(DEFAULT_WINDOW_HOURS);
  const refresh = useRefreshChart(patientId);
  const patientQ = useSWR<PatientDetail>(keys.patient, fetchJson, { fallbackData: initial?.patient, refreshInterval: PATIENT_POLL_MS });
  const seriesQ = useSWR<SeriesResponse>(keys.series(hours), fetchJson, { refreshInterval: POLL_MS, keepPreviousData: true });
  const patient = patientQ.data;

  if (!patient) {
    if (patientQ.error) {
      const e = patientQ.error;
      const words = e instanceof ApiClientError && e.status === 404 ? 'No such patient.' : e instanceof ApiClientError && e.status === 403 ? 'You may not see this patient’s chart.' : `Could not load the patient: ${errorText(e)}`;
      return <p role="alert" className="panel">{words}</p>;
    }
    return <p className="panel">Loading the bed chart…</p>;
  }

  const tz = patient.timeZone;
  const band = patient.band;

  return (
    <div className="space-y-4" data-testid="bed-chart">
      <header className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
        <h1 className="text-2xl font-bold">{patient.bed ? `${patient.bed.label} · ` : ''}{patient.label}</h1>
        <p className="text-sm text-ink-600 dark:text-ink-300">
          {patient.bed ? patient.bed.unitName : 'Discharged — the chart can be read, not added to'}
          {band && <> · band <strong>{band.low}–{band.high} %</strong> (NEWS2 Scale {band.news2Scale})</>}
          {!band && <> · <strong>no band ordered</strong></>}
          {patient.co2RetentionRisk && <> · at risk of CO₂ retention</>}
        </p>
        <GasBias patientId={patientId} />
        {patient.lastCharted && (
          <p className="text-sm text-ink-500 dark:text-ink-400">Last charted obs {formatDateTime(patient.lastCharted.takenAt, tz)}</p>
        )}
        {patientQ.error && <p role="alert" className="text-sm text-coral-800 dark:text-coral-200">Could not refresh the patient: {errorText(patientQ.error)}</p>}
      </header>

      <div className="grid gap-4 xl:grid-cols-3">
        <div className="panel min-w-0 xl:col-span-2">
          <SaturationChart series={seriesQ.data} timeZone={tz} hours={hours} onHoursChange={setHours} error={seriesQ.error} size={chartSize} />
        </div>
        <div className="panel">
          <DerivedFigures derived={seriesQ.data?.derived} timeZone={tz} />
        </div>
      </div>

      <div className="grid gap-4 xl:grid-cols-3">
        {patient.can.chart && (
          <div className="panel">
            <ObsEntryForm key={patient.id} patientId={patientId} lastCharted={patient.lastCharted} timeZone={tz} onSaved={() => void refresh()} />
          </div>
        )}
        <div className={`panel min-w-0 ${patient.can.chart ? 'xl:col-span-2' : 'xl:col-span-3'}`}>
          <ObsRecordTable patientId={patientId} timeZone={tz} canChart={patient.can.chart} orders={patient.orders} lastCharted={patient.lastCharted} />
        </div>
      </div>

      <div className="panel">
        <TargetOrderPanel patientId={patientId} timeZone={tz} canOrder={patient.can.order} initialOrders={patient.orders} co2RetentionRisk={patient.co2RetentionRisk} />
      </div>
    </div>
  );
}
