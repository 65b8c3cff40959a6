/**
 * The figures the server derives for the chart window: band compliance, hypoxaemic burden, and
 * the indices of the latest reading (S/F, ROX on high-flow, NEWS2, imputed P/F). The island only
 * shows them; it computes nothing a second way. An estimated FiO₂ is always called estimated.
 */
import type { ReactNode } from 'react';
import type { DerivedFigures as Derived } from '~/lib/charting/api-types.ts';
import { DEVICE_LABELS } from '~/lib/charting/obs-input.ts';
import { StateIcon, fmtFio2, formatClock } from './chart-shared.tsx';

export interface DerivedFiguresProps {
  derived: Derived | undefined;
  timeZone: string;
}

const NEWS2_PARAMETER_WORDS: Record<string, string> = {
  respRate: 'respiratory rate',
  spo2: 'SpO₂',
  airOrOxygen: 'air or oxygen',
  systolic: 'systolic BP',
  pulse: 'heart rate',
  heartRate: 'heart rate',
  consciousness: 'consciousness',
  temperature: 'temperature',
};
const NEWS2_RESPONSE_WORDS: Record<string, string> = {
  low: 'low',
  low_medium: 'low–medium (one parameter scores 3)',
  medium: 'medium',
  high: 'high',
};

const minutes = (m: number) => `${Math.round(m)} min`;

function Figure({
  label,
  value,
  detail,
  testId,
  icon,
}: {
  label: string;
  value: ReactNode;
  detail?: ReactNode;
  testId: string;
  icon?: ReactNode;
}) {
  return (
    <div className="rounded-md border border-ink-100 p-2 dark:border-ink-800" data-testid={testId}>
      <dt className="flex min-w-0 items-center gap-1 hyphens-auto break-words text-xs font-bold uppercase tracking-wide text-ink-500 [overflow-wrap:anywhere] dark:text-ink-400">
        {icon}
        {label}
      </dt>
      <dd className="text-xl font-bold">{value}</dd>
      {detail && <dd className="text-xs text-ink-600 dark:text-ink-300">{detail}</dd>}
    </div>
  );
}

export default function DerivedFigures({ derived, timeZone }: DerivedFiguresProps) {
  if (!derived) {
    return (
      <section aria-labelledby="derived-title">
        <h2 id="derived-title" className="text-lg font-bold">
          Figures
        </h2>
        <p className="text-ink-500">Loading figures…</p>
      </section>
    );
  }
  const c = derived.compliance;
  const l = derived.latest;
  const fio2Words =
    l.fio2 === null ? null : `FiO₂ ${fmtFio2(l.fio2)}${l.fio2Estimated ? ' (estimated from device and flow)' : ''}`;
  const news2 = l.news2;

  return (
    <section aria-labelledby="derived-title" data-testid="derived-figures">
      <h2 id="derived-title" className="text-lg font-bold">
        Figures · last {derived.window.hours} h
      </h2>
      <p className="text-xs text-ink-500 dark:text-ink-400">
        {formatClock(derived.window.from, timeZone)}–{formatClock(derived.window.to, timeZone)} · untrusted readings are
        left out of band time and counted apart
      </p>
      <dl className="mt-2 grid grid-cols-2 gap-2 lg:grid-cols-3">
        <Figure
          testId="fig-in-band"
          label="Time in band"
          icon={<StateIcon state="in" className="h-3 w-3 text-glass-600" />}
          value={c.inBandPct === null ? '—' : `${Math.round(c.inBandPct)} %`}
          detail={
            c.inBandPct === null
              ? `no band ordered for ${minutes(c.noBandMin)}`
              : `${minutes(c.inBandMin)} of ${minutes(c.windowMin)}`
          }
        />
        <Figure
          testId="fig-below"
          label="Below band"
          icon={<StateIcon state="below" className="h-3 w-3 text-coral-600" />}
          value={minutes(c.belowMin)}
        />
        <Figure
          testId="fig-above"
          label="Above band"
          icon={<StateIcon state="above" className="h-3 w-3 text-iris-600" />}
          value={minutes(c.aboveMin)}
        />
        <Figure
          testId="fig-untrusted"
          label="Untrusted"
          icon={<StateIcon state="untrusted" className="h-3 w-3" />}
          value={minutes(c.untrustedMin)}
          detail={`${c.untrustedReadings} untrusted of ${c.trustedReadings + c.untrustedReadings} readings`}
        />
        <Figure
          testId="fig-no-reading"
          label="No reading"
          value={minutes(c.noReadingMin)}
          detail={c.noBandMin > 0 ? `no band ordered: ${minutes(c.noBandMin)}` : undefined}
        />
        <Figure
          testId="fig-burden"
          label="Hypoxaemic burden"
          value={`${Math.round(c.burdenPctMin)} %·min`}
          detail="area below the band"
        />
        <Figure
          testId="fig-sf"
          label="S/F"
          value={l.sf === null ? '—' : Math.round(l.sf)}
          detail={
            l.sf === null
              ? 'needs SpO₂ and FiO₂'
              : `SpO₂ ${l.spo2} % · ${fio2Words}${l.takenAt ? ` · ${formatClock(l.takenAt, timeZone)}` : ''}`
          }
        />
        {l.rox !== null && (
          <Figure
            testId="fig-rox"
            label="ROX"
            value={l.rox.toFixed(2)}
            detail={l.roxNote ?? (l.device ? DEVICE_LABELS[l.device] : undefined)}
          />
        )}
        <Figure
          testId="fig-news2"
          label={news2 ? `NEWS2 · Scale ${news2.scale}` : 'NEWS2'}
          value={news2 ? (news2.total === null ? 'incomplete' : news2.total) : '—'}
          detail={
            news2 ? (
              <>
                {news2.response && <>Response: {NEWS2_RESPONSE_WORDS[news2.response] ?? news2.response}. </>}
                {!news2.complete && news2.missing.length > 0 && (
                  <>missing: {news2.missing.map((m) => NEWS2_PARAMETER_WORDS[m] ?? m).join(', ')}. </>
                )}
                from obs at {formatClock(news2.takenAt, timeZone)}
              </>
            ) : (
              'no charted obs in this window'
            )
          }
        />
        <Figure
          testId="fig-pf"
          label="Imputed P/F"
          value={l.imputedPf ? Math.round(l.imputedPf.pf) : '—'}
          detail={
            l.imputedPf
              ? `PaO₂ about ${Math.round(l.imputedPf.pao2)} mmHg imputed from SpO₂${l.fio2Estimated ? ' · FiO₂ estimated' : ''} — not a blood gas`
              : (l.imputedPfNote ?? 'not available')
          }
        />
      </dl>
    </section>
  );
}
