import { useState } from 'react';
import {
  Bar,
  BarChart,
  CartesianGrid,
  Legend,
  Line,
  LineChart,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import {
  REPORT_DAYS,
  type ReportDays,
  type ReportFiguresView,
  type UnitReportResponse,
} from '~/lib/reports/api-types.ts';
import { ApiClientError, fetchJson } from '~/lib/client/fetch-json.ts';
import { formatCount, formatDate, formatDateTime } from '~/lib/time/format.ts';
import { palette } from '~/lib/ui/palette.mjs';

const dash = '—';
const n1 = (v: number | null) => (v === null ? dash : v.toFixed(1));
const shortDay = (iso: string, tz: string) => formatDate(iso, tz).replace(/ \d{4}$/, '');

function Row({ label, f, testId }: { label: string; f: ReportFiguresView; testId?: string }) {
  const e = f.escalations;
  return (
    <tr className="border-t border-ink-200 dark:border-ink-700" data-testid={testId}>
      <th scope="row" data-label="Day" className="whitespace-nowrap px-2 py-1 text-left font-normal">
        {label}
      </th>
      <td data-label="Patient-days" className="px-2 py-1 text-right">
        {f.patientDays.toFixed(1)}
      </td>
      <td data-label="Time in band %" className="px-2 py-1 text-right">
        {n1(f.timeInBandPct)}
      </td>
      <td data-label="Min below band per patient-day" className="px-2 py-1 text-right">
        {n1(f.belowMinPerPatientDay)}
      </td>
      <td data-label="Below-band escalations (standard / urgent)" className="px-2 py-1 text-right">
        {e.belowStandard} / {e.belowUrgent}
      </td>
      <td data-label="Probe checks" className="px-2 py-1 text-right">
        {e.probeCheck}
      </td>
      <td data-label="Wean prompts" className="px-2 py-1 text-right">
        {e.weanPrompt}
      </td>
      <td data-label="Raised → claimed, min (median / 90th)" className="px-2 py-1 text-right">
        {n1(f.toClaimMin.median)} / {n1(f.toClaimMin.p90)}
      </td>
      <td data-label="Claimed → closed, min (median / 90th)" className="px-2 py-1 text-right">
        {n1(f.toCloseMin.median)} / {n1(f.toCloseMin.p90)}
      </td>
      <td data-label="Obs overdue" className="px-2 py-1 text-right">
        {formatCount(f.overdueCount)}
      </td>
      <td data-label="Untrusted readings %" className="px-2 py-1 text-right">
        {n1(f.untrustedSharePct)}
      </td>
    </tr>
  );
}

/** The unit report: period switch, three charts and the table; every figure comes from the API. */
export default function ReportView({ initial }: { initial: UnitReportResponse }) {
  const [report, setReport] = useState(initial);
  const [loading, setLoading] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const tz = report.unit.timeZone;

  async function show(days: ReportDays) {
    setLoading(true);
    setProblem(null);
    try {
      const next = await fetchJson<UnitReportResponse>(`/api/reports/units/${report.unit.code}?days=${days}`);
      setReport(next);
      window.history.replaceState(null, '', `/reports?unit=${next.unit.code}&days=${days}`);
    } catch (err) {
      setProblem(err instanceof ApiClientError ? err.message : 'Could not load the report.');
    } finally {
      setLoading(false);
    }
  }

  const data = report.perDay.map((d) => ({
    day: shortDay(d.from, tz),
    inBand: d.timeInBandPct,
    below: d.belowMinPerPatientDay,
    belowStandard: d.escalations.belowStandard,
    belowUrgent: d.escalations.belowUrgent,
    probe: d.escalations.probeCheck,
    wean: d.escalations.weanPrompt,
  }));
  const axis = { fill: 'currentColor', fontSize: 12 };

  return (
    <div data-testid="report-view" aria-busy={loading}>
      <div className="mb-3 flex flex-wrap items-center gap-2">
        <span className="text-sm">Period:</span>
        {REPORT_DAYS.map((d) => (
          <button
            key={d}
            type="button"
            className={`btn-quiet text-sm ${d === report.days ? 'ring-2 ring-glass-500' : ''}`}
            aria-pressed={d === report.days}
            onClick={() => show(d)}
            disabled={loading}
          >
            {d} days
          </button>
        ))}
        <a
          className="btn-quiet text-sm"
          href={`/api/reports/units/${report.unit.code}/csv?days=${report.days}`}
          download
          data-testid="report-csv"
        >
          Download CSV
        </a>
        <span className="text-sm text-ink-600 dark:text-ink-300" data-testid="report-period">
          {formatDateTime(report.period.from, tz)} – {formatDateTime(report.period.to, tz)} ({tz}), whole days; today is
          on the board and the handover sheet
        </span>
      </div>
      {problem && (
        <p role="alert" className="panel">
          {problem}
        </p>
      )}
      <div className="grid gap-4 lg:grid-cols-3">
        <figure className="panel">
          <figcaption className="mb-1 font-bold">Time in band, % of trusted time</figcaption>
          <div className="h-56">
            <ResponsiveContainer width="100%" height="100%">
              <LineChart data={data} margin={{ top: 5, right: 10, bottom: 5, left: 0 }}>
                <CartesianGrid strokeDasharray="3 3" strokeOpacity={0.3} />
                <XAxis dataKey="day" tick={axis} minTickGap={16} />
                <YAxis domain={[0, 100]} tick={axis} width={36} />
                <Tooltip />
                <Line
                  type="monotone"
                  dataKey="inBand"
                  name="in band %"
                  stroke={palette.glass[600]}
                  strokeWidth={2}
                  dot={{ r: 2 }}
                  connectNulls={false}
                  isAnimationActive={false}
                />
              </LineChart>
            </ResponsiveContainer>
          </div>
        </figure>
        <figure className="panel">
          <figcaption className="mb-1 font-bold">▼ Minutes below band per patient-day</figcaption>
          <div className="h-56">
            <ResponsiveContainer width="100%" height="100%">
              <BarChart data={data} margin={{ top: 5, right: 10, bottom: 5, left: 0 }}>
                <CartesianGrid strokeDasharray="3 3" strokeOpacity={0.3} />
                <XAxis dataKey="day" tick={axis} minTickGap={16} />
                <YAxis tick={axis} width={40} />
                <Tooltip />
                <Bar
                  dataKey="below"
                  name="min below band / patient-day"
                  fill={palette.coral[600]}
                  isAnimationActive={false}
                />
              </BarChart>
            </ResponsiveContainer>
          </div>
        </figure>
        <figure className="panel">
          <figcaption className="mb-1 font-bold">Escalations raised, by kind and severity</figcaption>
          <div className="h-56">
            <ResponsiveContainer width="100%" height="100%">
              <BarChart data={data} margin={{ top: 5, right: 10, bottom: 5, left: 0 }}>
                <CartesianGrid strokeDasharray="3 3" strokeOpacity={0.3} />
                <XAxis dataKey="day" tick={axis} minTickGap={16} />
                <YAxis allowDecimals={false} tick={axis} width={30} />
                <Tooltip />
                <Legend wrapperStyle={{ fontSize: 12 }} />
                <Bar
                  dataKey="belowUrgent"
                  stackId="e"
                  name="below band, urgent"
                  fill={palette.coral[800]}
                  isAnimationActive={false}
                />
                <Bar
                  dataKey="belowStandard"
                  stackId="e"
                  name="below band"
                  fill={palette.coral[400]}
                  isAnimationActive={false}
                />
                <Bar dataKey="probe" stackId="e" name="probe check" fill={palette.ink[400]} isAnimationActive={false} />
                <Bar dataKey="wean" stackId="e" name="wean prompt" fill={palette.iris[500]} isAnimationActive={false} />
              </BarChart>
            </ResponsiveContainer>
          </div>
        </figure>
      </div>
      <div className="panel mt-4 overflow-x-auto">
        <table className="stack-table w-full text-sm" data-testid="report-table">
          <caption className="mb-2 text-left font-bold">Per day ({tz})</caption>
          <thead>
            <tr className="text-right align-bottom">
              <th scope="col" className="px-2 text-left">
                Day
              </th>
              <th scope="col" className="px-2">
                Patient-days
              </th>
              <th scope="col" className="px-2">
                Time in band %
              </th>
              <th scope="col" className="px-2">
                Min below band per patient-day
              </th>
              <th scope="col" className="px-2">
                Below-band escalations (standard / urgent)
              </th>
              <th scope="col" className="px-2">
                Probe checks
              </th>
              <th scope="col" className="px-2">
                Wean prompts
              </th>
              <th scope="col" className="px-2">
                Raised → claimed, min (median / 90th)
              </th>
              <th scope="col" className="px-2">
                Claimed → closed, min (median / 90th)
              </th>
              <th scope="col" className="px-2">
                Obs overdue
              </th>
              <th scope="col" className="px-2">
                Untrusted readings %
              </th>
            </tr>
          </thead>
          <tbody>
            {report.perDay.map((d) => (
              <Row key={d.date} label={formatDate(d.from, tz)} f={d} />
            ))}
            <Row label={`All ${report.days} days`} f={report.total} testId="report-total" />
          </tbody>
        </table>
      </div>
    </div>
  );
}
