import { useEffect, useState, type FormEvent } from 'react';
import useSWR from 'swr';
import { fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';

interface Settings {
  consecutiveCharted: number;
  deviceDwellMin: number;
  urgentMarginPoints: number;
  urgentFloorPct: number;
  cannotVerifyMin: number;
  aboveOnOxygenMin: number;
  renotifyMin: number;
  overdueMin: number;
  monitorSilentMin: number;
  silentBelowProbeMin: number;
  outreachEmails: string[];
  unitPhone: string | null;
  gasUnit: 'kPa' | 'mmHg';
  barometricMmHg: number;
  shiftStart: string;
  shiftEnd: string;
}
interface Answer {
  unit: { code: string; name: string };
  configured: boolean;
  settings: Settings;
  updatedAt: string | null;
}

const FIELDS: [
  keyof Omit<Settings, 'outreachEmails' | 'unitPhone' | 'gasUnit' | 'shiftStart' | 'shiftEnd'>,
  string,
  string,
][] = [
  [
    'consecutiveCharted',
    'Consecutive charted obs below band',
    'trusted charted obs in a row that raise a below-band escalation',
  ],
  ['deviceDwellMin', 'Device dwell (min)', 'minutes of trusted monitor readings below band that raise one'],
  ['urgentMarginPoints', 'Urgent margin (points)', 'a reading this far under the lower limit makes it urgent'],
  ['urgentFloorPct', 'Urgent floor (%)', 'a reading under this makes it urgent'],
  ['cannotVerifyMin', 'Cannot-verify time (min)', 'minutes of poor traces only before a probe check'],
  ['aboveOnOxygenMin', 'Above band on O₂ (min)', 'minutes above band on oxygen before a wean prompt'],
  ['renotifyMin', 'Re-notify after (min)', 'unclaimed escalations are e-mailed again after this'],
  ['overdueMin', 'Obs overdue after (min)', 'the board marks a bed overdue past this'],
  ['barometricMmHg', 'Barometric pressure (mmHg)', 'for the alveolar gas equation (760 at sea level)'],
  ['monitorSilentMin', 'Monitor silent after (min)', 'a monitored bed with no newer device reading is shown as silent'],
  [
    'silentBelowProbeMin',
    'Silent after below band: probe check (min)',
    'silence this long right after trusted below-band readings asks for a bedside probe check',
  ],
];

// Wall-clock times in the unit's zone, typed as HH:MM (24-hour): never the browser's time input, which follows its locale.
const SHIFT_FIELDS: ['shiftStart' | 'shiftEnd', string, string][] = [
  ['shiftStart', 'Day shift starts (HH:MM)', 'the handover sheet covers the shift that is running'],
  ['shiftEnd', 'Day shift ends (HH:MM)', 'the night shift runs from here to the next start'],
];

/** A unit's escalation settings. Defaults are settings, not clinical advice: each unit decides. */
export default function UnitSettingsForm({ unitCode }: { unitCode: string }) {
  const { data, mutate } = useSWR<Answer>(`/api/units/${encodeURIComponent(unitCode)}/settings`, fetchJson);
  const [values, setValues] = useState<Record<string, string>>({});
  const { errors, alert, status, act } = useForm();
  useEffect(() => {
    if (!data) return;
    const v: Record<string, string> = Object.fromEntries(FIELDS.map(([k]) => [k, String(data.settings[k])]));
    v.outreachEmails = data.settings.outreachEmails.join('\n');
    v.shiftStart = data.settings.shiftStart;
    v.shiftEnd = data.settings.shiftEnd;
    v.gasUnit = data.settings.gasUnit;
    v.unitPhone = data.settings.unitPhone ?? '';
    setValues(v);
  }, [data]);
  if (!data) return <p>Loading…</p>;

  async function submit(event: FormEvent) {
    event.preventDefault();
    const body: Record<string, unknown> = Object.fromEntries(
      FIELDS.map(([k]) => [k, values[k] === '' ? undefined : Number(values[k])]),
    );
    body.outreachEmails = (values.outreachEmails ?? '').split(/[\s,;]+/).filter(Boolean);
    body.shiftStart = values.shiftStart?.trim() || undefined;
    body.shiftEnd = values.shiftEnd?.trim() || undefined;
    body.gasUnit = values.gasUnit;
    body.unitPhone = (values.unitPhone ?? '').trim() || null;
    await act('Saved.', () => postJson(`/api/units/${encodeURIComponent(unitCode)}/settings`, body, 'PUT'), {
      rawFieldPaths: true,
      after: mutate,
    });
  }

  return (
    <form
      onSubmit={submit}
      className="panel grid gap-3 md:grid-cols-2"
      aria-label={`Settings for ${data.unit.name}`}
      noValidate
    >
      <h2 className="text-lg font-bold md:col-span-2">
        {data.unit.name}
        {data.configured ? '' : ' (defaults)'}
      </h2>
      {FIELDS.map(([k, label, hint]) => (
        <label key={k} className="block">
          <span className="block font-bold">{label}</span>
          <input
            className="field"
            inputMode="numeric"
            value={values[k] ?? ''}
            onChange={(e) => setValues({ ...values, [k]: e.target.value })}
            aria-invalid={errors[k] ? true : undefined}
            aria-describedby={`${unitCode}-${k}-hint`}
          />
          <span
            id={`${unitCode}-${k}-hint`}
            className={`text-sm ${errors[k] ? 'font-bold text-coral-700' : 'text-ink-500'}`}
          >
            {errors[k] ?? hint}
          </span>
        </label>
      ))}
      {SHIFT_FIELDS.map(([k, label, hint]) => (
        <label key={k} className="block">
          <span className="block font-bold">{label}</span>
          <input
            className="field font-mono"
            inputMode="numeric"
            maxLength={5}
            value={values[k] ?? ''}
            onChange={(e) => setValues({ ...values, [k]: e.target.value })}
            aria-invalid={errors[k] ? true : undefined}
            aria-describedby={`${unitCode}-${k}-hint`}
          />
          <span
            id={`${unitCode}-${k}-hint`}
            className={`text-sm ${errors[k] ? 'font-bold text-coral-700' : 'text-ink-500'}`}
          >
            {errors[k] ?? hint}
          </span>
        </label>
      ))}
      <label className="block">
        <span className="block font-bold">Blood-gas unit</span>
        <select
          className="field"
          value={values.gasUnit ?? 'kPa'}
          onChange={(e) => setValues({ ...values, gasUnit: e.target.value })}
          aria-describedby={`${unitCode}-gasUnit-hint`}
        >
          <option value="kPa">kPa</option>
          <option value="mmHg">mmHg</option>
        </select>
        <span
          id={`${unitCode}-gasUnit-hint`}
          className={`text-sm ${errors.gasUnit ? 'font-bold text-coral-700' : 'text-ink-500'}`}
        >
          {errors.gasUnit ?? 'PaO₂ and PaCO₂ are shown in this unit (stored in mmHg)'}
        </span>
      </label>
      <label className="block">
        <span className="block font-bold">Unit phone</span>
        <input
          className="field"
          inputMode="tel"
          value={values.unitPhone ?? ''}
          onChange={(e) => setValues({ ...values, unitPhone: e.target.value })}
          aria-invalid={errors.unitPhone ? true : undefined}
          aria-describedby={`${unitCode}-unitPhone-hint`}
        />
        <span
          id={`${unitCode}-unitPhone-hint`}
          className={`text-sm ${errors.unitPhone ? 'font-bold text-coral-700' : 'text-ink-500'}`}
        >
          {errors.unitPhone ?? 'given in escalation e-mail, so outreach can call the bedside'}
        </span>
      </label>
      <label className="block md:col-span-2">
        <span className="block font-bold">Outreach e-mail addresses (one per line)</span>
        <textarea
          className="field font-mono"
          rows={3}
          value={values.outreachEmails ?? ''}
          onChange={(e) => setValues({ ...values, outreachEmails: e.target.value })}
        />
        {Object.entries(errors)
          .filter(([k]) => k.startsWith('outreachEmails'))
          .map(([k, v]) => (
            <span key={k} className="block text-sm font-bold text-coral-700">
              {v}
            </span>
          ))}
      </label>
      <div className="flex items-center gap-3 md:col-span-2">
        <button className="btn-primary" type="submit">
          Save settings
        </button>
        <span role="status">{status}</span>
        {alert && (
          <span role="alert" className="text-coral-700">
            {alert}
          </span>
        )}
      </div>
    </form>
  );
}
