import { useState, type FormEvent, type ReactElement } from 'react';
import useSWR from 'swr';
import type { PatientSummary } from '~/lib/charting/api-types.ts';
import { fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';
import { usePolled } from '~/lib/client/use-polled.ts';
import { formatDateTime } from '~/lib/time/format.ts';

interface Props {
  timeZone: string;
  unitCode: string;
  units: { code: string; name: string }[];
  canAdmit: boolean;
}
interface BedsResponse {
  unit: { code: string; name: string };
  beds: { id: number; label: string; occupied: boolean }[];
}

/** A unit's patients with admit, move and discharge for the charge nurse. */
export default function PatientList({ timeZone, unitCode, units, canAdmit }: Props) {
  const [showDischarged, setShowDischarged] = useState(false);
  const listKey = `/api/patients?unit=${encodeURIComponent(unitCode)}&discharged=${showDischarged ? 'include' : 'exclude'}`;
  const { data, error, mutate } = usePolled<{ patients: PatientSummary[] }>(listKey, 15_000);
  const beds = useSWR<BedsResponse>(canAdmit ? `/api/units/${encodeURIComponent(unitCode)}/beds` : null, fetchJson);
  const [status, setStatus] = useState<string | null>(null);

  async function refresh(message: string) {
    setStatus(message);
    await Promise.all([mutate(), beds.mutate()]);
  }

  const freeBeds = beds.data?.beds.filter((b) => !b.occupied) ?? [];

  return (
    <div className="space-y-6">
      <p role="status" aria-live="polite" className="min-h-[1.5rem] text-glass-700 dark:text-glass-300">
        {status}
      </p>
      {canAdmit && <AdmitForm freeBeds={freeBeds} onDone={refresh} />}
      <section className="panel">
        <div className="mb-3 flex flex-wrap items-center gap-4">
          <h2 className="text-lg font-bold">Patients</h2>
          <label className="flex items-center gap-2 text-sm">
            <input type="checkbox" checked={showDischarged} onChange={(e) => setShowDischarged(e.target.checked)} />{' '}
            include discharged
          </label>
        </div>
        {error && <p role="alert">Could not load patients: {(error as Error).message}</p>}
        {!data && !error && <p>Loading…</p>}
        {data && data.patients.length === 0 && <p className="text-ink-500">No patients.</p>}
        {data && data.patients.length > 0 && (
          <table className="stack-table w-full text-sm" data-testid="patient-table">
            <thead>
              <tr className="text-left text-ink-500">
                <th className="py-1">Bed</th>
                <th>Patient</th>
                <th>Band</th>
                <th>Admitted</th>
                <th>
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {data.patients.map((p) => (
                <tr key={p.id} className="border-t border-ink-100 align-top dark:border-ink-800">
                  <td data-label="Bed" className="py-2 font-mono">
                    {p.bed?.label ?? <span className="text-ink-400">discharged</span>}
                  </td>
                  <td data-label="Patient">
                    <a className="font-bold underline" href={`/patients/${p.id}`}>
                      {p.familyName}, {p.givenName}
                    </a>{' '}
                    <span className="text-ink-500">
                      {p.mrn}
                      {p.co2RetentionRisk ? ' · CO₂ retention risk' : ''}
                    </span>
                  </td>
                  <td data-label="Band">
                    {p.band ? `${p.band.low}–${p.band.high} %` : <strong>no band ordered</strong>}
                  </td>
                  <td data-label="Admitted">{p.admittedAt ? formatDateTime(p.admittedAt, timeZone) : ''}</td>
                  <td>
                    {canAdmit && p.bed && (
                      <StayActions patient={p} units={units} currentUnit={unitCode} onDone={refresh} />
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}

function FieldError({ id, message }: { id: string; message?: string }) {
  return message ? (
    <span id={id} className="mt-1 block text-sm text-coral-700 dark:text-coral-300">
      {message}
    </span>
  ) : null;
}

function AdmitForm({
  freeBeds,
  onDone,
}: {
  freeBeds: { id: number; label: string }[];
  onDone: (m: string) => Promise<void>;
}) {
  const { errors, alert, busy, submit: run } = useForm();

  async function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = event.currentTarget;
    const f = new FormData(form);
    const admitted = await run(() =>
      postJson<{ patient: PatientSummary }>('/api/patients', {
        givenName: f.get('givenName'),
        familyName: f.get('familyName'),
        mrn: f.get('mrn'),
        dateOfBirth: f.get('dateOfBirth'),
        co2RetentionRisk: f.get('co2RetentionRisk') === 'on',
        bedId: f.get('bedId') ? Number(f.get('bedId')) : undefined,
      }),
    );
    if (admitted === undefined) return;
    const { patient } = admitted;
    form.reset();
    await onDone(`${patient.familyName}, ${patient.givenName} admitted to bed ${patient.bed?.label}.`);
  }

  const field = (name: string, label: string, input: ReactElement) => (
    // biome-ignore lint/a11y/noLabelWithoutControl: the control is the `input` element passed in
    <label className="block">
      <span className="mb-1 block font-bold">{label}</span>
      {input}
      <FieldError id={`admit-${name}-error`} message={errors[name]} />
    </label>
  );
  const aria = (name: string) => ({
    'aria-invalid': errors[name] ? true : undefined,
    'aria-describedby': errors[name] ? `admit-${name}-error` : undefined,
  });

  return (
    <form className="panel grid gap-3 md:grid-cols-3" onSubmit={submit} aria-labelledby="admit-heading" noValidate>
      <h2 id="admit-heading" className="text-lg font-bold md:col-span-3">
        Admit a patient
      </h2>
      {field('givenName', 'Given name', <input className="field" name="givenName" required {...aria('givenName')} />)}
      {field(
        'familyName',
        'Family name',
        <input className="field" name="familyName" required {...aria('familyName')} />,
      )}
      {field('mrn', 'MRN', <input className="field font-mono" name="mrn" required {...aria('mrn')} />)}
      {field(
        'dateOfBirth',
        'Date of birth',
        <input className="field" type="date" name="dateOfBirth" required {...aria('dateOfBirth')} />,
      )}
      {field(
        'bedId',
        'Bed',
        <select className="field" name="bedId" required {...aria('bedId')}>
          <option value="">Choose a free bed…</option>
          {freeBeds.map((b) => (
            <option key={b.id} value={b.id}>
              {b.label}
            </option>
          ))}
        </select>,
      )}
      <label className="flex items-center gap-2 self-end pb-2">
        <input type="checkbox" name="co2RetentionRisk" /> Risk of CO₂ retention
      </label>
      <div className="md:col-span-3 flex items-center gap-3">
        <button className="btn-primary" type="submit" disabled={busy}>
          Admit
        </button>
        {alert && (
          <span role="alert" className="text-coral-700 dark:text-coral-300">
            {alert}
          </span>
        )}
      </div>
    </form>
  );
}

function StayActions({
  patient,
  units,
  currentUnit,
  onDone,
}: {
  patient: PatientSummary;
  units: { code: string; name: string }[];
  currentUnit: string;
  onDone: (m: string) => Promise<void>;
}) {
  const [mode, setMode] = useState<'none' | 'move' | 'discharge'>('none');
  const [targetUnit, setTargetUnit] = useState(currentUnit);
  const beds = useSWR<BedsResponse>(
    mode === 'move' ? `/api/units/${encodeURIComponent(targetUnit)}/beds` : null,
    fetchJson,
  );
  const { alert: error, submit: run } = useForm();

  async function act(url: string, body: unknown, message: string) {
    if ((await run(() => postJson(url, body))) === undefined) return;
    setMode('none');
    await onDone(message);
  }

  if (mode === 'none') {
    return (
      <div className="flex gap-2">
        <button type="button" className="btn-quiet" onClick={() => setMode('move')}>
          Move
        </button>
        <button type="button" className="btn-quiet" onClick={() => setMode('discharge')}>
          Discharge
        </button>
      </div>
    );
  }
  if (mode === 'discharge') {
    return (
      <div className="space-y-1">
        <p>
          Discharge {patient.label} from bed {patient.bed?.label}? The record stays readable.
        </p>
        <div className="flex gap-2">
          <button
            type="button"
            className="btn-primary"
            onClick={() => act(`/api/patients/${patient.id}/discharge`, {}, `${patient.label} discharged.`)}
          >
            Confirm discharge
          </button>
          <button type="button" className="btn-quiet" onClick={() => setMode('none')}>
            Cancel
          </button>
        </div>
        {error && (
          <p role="alert" className="text-coral-700">
            {error}
          </p>
        )}
      </div>
    );
  }
  const free = beds.data?.beds.filter((b) => !b.occupied) ?? [];
  return (
    <form
      className="flex flex-wrap items-end gap-2"
      onSubmit={(e) => {
        e.preventDefault();
        const bedId = Number(new FormData(e.currentTarget).get('bedId'));
        const label = free.find((b) => b.id === bedId)?.label;
        void act(`/api/patients/${patient.id}/move`, { bedId }, `${patient.label} moved to bed ${label}.`);
      }}
    >
      <label>
        Unit{' '}
        <select className="field" value={targetUnit} onChange={(e) => setTargetUnit(e.target.value)}>
          {units.map((u) => (
            <option key={u.code} value={u.code}>
              {u.name}
            </option>
          ))}
        </select>
      </label>
      <label>
        Bed{' '}
        <select className="field" name="bedId" required>
          {free.map((b) => (
            <option key={b.id} value={b.id}>
              {b.label}
            </option>
          ))}
        </select>
      </label>
      <button className="btn-primary" type="submit" disabled={free.length === 0}>
        Move
      </button>
      <button className="btn-quiet" type="button" onClick={() => setMode('none')}>
        Cancel
      </button>
      {error && (
        <p role="alert" className="w-full text-coral-700">
          {error}
        </p>
      )}
    </form>
  );
}
