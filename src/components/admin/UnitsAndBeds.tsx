import useSWR from 'swr';
import { useState } from 'react';
import { fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';
import { formatDate } from '~/lib/time/format.ts';
import type { AdminUnit } from '~/lib/staff/api-types.ts';

/** Units and their beds: create and rename units; add, rename, reorder and retire beds. */
export default function UnitsAndBeds() {
  const { data, error, mutate } = useSWR<{ units: AdminUnit[] }>('/api/admin/units', fetchJson);
  const actions = useForm();
  const fields = actions.errors;
  const message = actions.alert ?? actions.status;
  const [unitForm, setUnitForm] = useState({ code: '', name: '', hospital: '', timeZone: 'Europe/London' });
  const [newBed, setNewBed] = useState<Record<string, string>>({});
  if (error) return <p role="alert">Could not load units: {String(error.message ?? error)}</p>;
  if (!data) return <p>Loading units…</p>;

  const act = (done: string, work: () => Promise<unknown>) =>
    actions.act(done, work, { failurePrefix: 'Not done: ', rawFieldPaths: true, after: mutate });

  async function move(unit: AdminUnit, index: number, by: -1 | 1) {
    const ids = unit.beds.filter((b) => b.active).map((b) => b.id);
    const j = index + by;
    if (j < 0 || j >= ids.length) return;
    [ids[index], ids[j]] = [ids[j], ids[index]];
    await act(`Beds of ${unit.code} reordered.`, () =>
      postJson(`/api/admin/units/${unit.code}/beds`, { bedIds: ids }, 'PUT'),
    );
  }

  const fieldError = (k: string) =>
    fields[k] && <span className="text-sm text-coral-700 dark:text-coral-300">{fields[k]}</span>;

  return (
    <div className="space-y-6">
      {message && (
        <p role="status" data-testid="units-message" className="rounded bg-glass-50 p-2 dark:bg-glass-900/40">
          {message}
        </p>
      )}
      {data.units.map((unit) => {
        const active = unit.beds.filter((b) => b.active);
        const retired = unit.beds.filter((b) => !b.active);
        return (
          <section key={unit.code} className="panel" data-testid={`unit-${unit.code}`}>
            <div className="mb-3 flex flex-wrap items-baseline gap-3">
              <h2 className="text-xl font-bold">{unit.name}</h2>
              <span className="text-ink-600 dark:text-ink-300">
                {unit.code} · {unit.hospital} · {unit.timeZone}
              </span>
              <button
                type="button"
                className="btn-quiet"
                onClick={() => {
                  const name = window.prompt(`New name for ${unit.code}`, unit.name);
                  if (name)
                    void act(`${unit.code} renamed.`, () =>
                      postJson(`/api/admin/units/${unit.code}`, { name }, 'PATCH'),
                    );
                }}
              >
                Rename unit
              </button>
            </div>
            <ol className="space-y-1" aria-label={`Beds of ${unit.name}, in board order`}>
              {active.map((bed, i) => (
                <li
                  key={bed.id}
                  className="flex flex-wrap items-center gap-2 border-t border-ink-100 py-1 dark:border-ink-800"
                >
                  <span className="w-20 font-bold">{bed.label}</span>
                  <span className="w-28 text-sm">{bed.occupied ? 'patient in bed' : 'free'}</span>
                  <button
                    type="button"
                    className="btn-quiet"
                    aria-label={`Move ${bed.label} up`}
                    disabled={i === 0}
                    onClick={() => move(unit, i, -1)}
                  >
                    ↑
                  </button>
                  <button
                    type="button"
                    className="btn-quiet"
                    aria-label={`Move ${bed.label} down`}
                    disabled={i === active.length - 1}
                    onClick={() => move(unit, i, 1)}
                  >
                    ↓
                  </button>
                  <button
                    type="button"
                    className="btn-quiet"
                    onClick={() => {
                      const label = window.prompt(`New label for ${bed.label}`, bed.label);
                      if (label)
                        void act(`Bed renamed to ${label}.`, () =>
                          postJson(`/api/admin/units/${unit.code}/beds/${bed.id}`, { label }, 'PATCH'),
                        );
                    }}
                  >
                    Rename
                  </button>
                  <button
                    type="button"
                    className="btn-quiet"
                    disabled={bed.occupied}
                    title={bed.occupied ? 'Move or discharge the patient first' : undefined}
                    onClick={() => {
                      const reason = window.prompt(`Why is ${bed.label} retired? (its history stays)`);
                      if (reason)
                        void act(`${bed.label} retired.`, () =>
                          postJson(`/api/admin/units/${unit.code}/beds/${bed.id}/retire`, { reason }),
                        );
                    }}
                  >
                    Retire
                  </button>
                </li>
              ))}
            </ol>
            {retired.length > 0 && (
              <p className="mt-2 text-sm text-ink-600 dark:text-ink-300">
                Retired (history kept):{' '}
                {retired
                  .map((b) => `${b.label}${b.retiredAt ? ` since ${formatDate(b.retiredAt, unit.timeZone)}` : ''}`)
                  .join(', ')}
              </p>
            )}
            <form
              className="mt-3 flex items-end gap-2"
              onSubmit={async (e) => {
                e.preventDefault();
                if (
                  await act(`Bed added to ${unit.code}.`, () =>
                    postJson(`/api/admin/units/${unit.code}/beds`, { label: newBed[unit.code] ?? '' }),
                  )
                )
                  setNewBed({ ...newBed, [unit.code]: '' });
              }}
            >
              <label className="block">
                <span className="mb-1 block text-sm font-bold">New bed label</span>
                <input
                  className="field"
                  value={newBed[unit.code] ?? ''}
                  onChange={(e) => setNewBed({ ...newBed, [unit.code]: e.target.value })}
                />
              </label>
              <button className="btn-quiet" type="submit">
                Add bed
              </button>
            </form>
          </section>
        );
      })}
      <form
        className="panel grid gap-3 md:grid-cols-5 md:items-end"
        data-testid="create-unit"
        noValidate
        onSubmit={async (e) => {
          e.preventDefault();
          if (await act(`Unit ${unitForm.code.toUpperCase()} created.`, () => postJson('/api/admin/units', unitForm)))
            setUnitForm({ ...unitForm, code: '', name: '' });
        }}
      >
        <label className="block">
          <span className="mb-1 block font-bold">Code</span>
          <input
            className="field"
            value={unitForm.code}
            onChange={(e) => setUnitForm({ ...unitForm, code: e.target.value })}
          />
          {fieldError('code')}
        </label>
        <label className="block">
          <span className="mb-1 block font-bold">Name</span>
          <input
            className="field"
            value={unitForm.name}
            onChange={(e) => setUnitForm({ ...unitForm, name: e.target.value })}
          />
          {fieldError('name')}
        </label>
        <label className="block">
          <span className="mb-1 block font-bold">Hospital</span>
          <input
            className="field"
            value={unitForm.hospital}
            onChange={(e) => setUnitForm({ ...unitForm, hospital: e.target.value })}
          />
          {fieldError('hospital')}
        </label>
        <label className="block">
          <span className="mb-1 block font-bold">Time zone</span>
          <input
            className="field"
            value={unitForm.timeZone}
            onChange={(e) => setUnitForm({ ...unitForm, timeZone: e.target.value })}
          />
          {fieldError('timeZone')}
        </label>
        <button className="btn-primary justify-center" type="submit">
          Create unit
        </button>
      </form>
    </div>
  );
}
