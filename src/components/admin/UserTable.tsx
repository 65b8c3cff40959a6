import useSWR from 'swr';
import { useState } from 'react';
import { fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';
import { ROLES, ROLE_LABELS, spansUnits, type Role } from '~/lib/auth/roles.ts';
import { formatDayTime } from '~/lib/time/format.ts';
import type { AdminUnit, StaffListItem } from '~/lib/staff/api-types.ts';

const needsUnit = (role: Role) => !spansUnits(role) && role !== 'admin';

/** Staff accounts: add a person (a set-password link goes by e-mail), change role or unit, end or restore access. */
export default function UserTable({ timeZone }: { timeZone: string }) {
  const { data, error, mutate } = useSWR<{ users: StaffListItem[] }>('/api/admin/users', fetchJson);
  const { data: unitData } = useSWR<{ units: AdminUnit[] }>('/api/admin/units', fetchJson);
  const actions = useForm();
  const fields = actions.errors;
  const message = actions.alert ?? actions.status;
  const [form, setForm] = useState({ name: '', email: '', role: 'nurse' as Role, unitCode: '' });
  const [editing, setEditing] = useState<number | null>(null);
  const [edit, setEdit] = useState({ role: 'nurse' as Role, unitCode: '' });
  if (error) return <p role="alert">Could not load staff: {String(error.message ?? error)}</p>;
  if (!data) return <p>Loading staff…</p>;
  const units = unitData?.units ?? [];
  const now = Date.now();

  const act = (done: string, work: () => Promise<unknown>) =>
    actions.act(done, work, { failurePrefix: 'Not done: ', rawFieldPaths: true, after: mutate });

  async function create(event: React.FormEvent) {
    event.preventDefault();
    const body = {
      name: form.name,
      email: form.email,
      role: form.role,
      ...(needsUnit(form.role) ? { unitCode: form.unitCode || undefined } : {}),
    };
    const ok = await act(`Account made for ${form.email}; a set-password link is on its way by e-mail.`, () =>
      postJson('/api/admin/users', body),
    );
    if (ok) setForm({ name: '', email: '', role: form.role, unitCode: form.unitCode });
  }

  const unitSelect = (value: string, onChange: (v: string) => void, id: string) => (
    <select id={id} className="field" value={value} onChange={(e) => onChange(e.target.value)}>
      <option value="">— choose —</option>
      {units.map((u) => (
        <option key={u.code} value={u.code}>
          {u.name} ({u.code})
        </option>
      ))}
    </select>
  );

  return (
    <div>
      <form
        onSubmit={create}
        className="mb-6 grid gap-3 md:grid-cols-5 md:items-end"
        data-testid="create-user"
        noValidate
      >
        <label className="block">
          <span className="mb-1 block font-bold">Name</span>
          <input
            className="field"
            name="name"
            value={form.name}
            onChange={(e) => setForm({ ...form, name: e.target.value })}
            aria-invalid={Boolean(fields.name)}
          />
          {fields.name && <span className="text-sm text-coral-700 dark:text-coral-300">{fields.name}</span>}
        </label>
        <label className="block">
          <span className="mb-1 block font-bold">E-mail</span>
          <input
            className="field"
            name="email"
            type="email"
            value={form.email}
            onChange={(e) => setForm({ ...form, email: e.target.value })}
            aria-invalid={Boolean(fields.email)}
          />
          {fields.email && <span className="text-sm text-coral-700 dark:text-coral-300">{fields.email}</span>}
        </label>
        <label className="block">
          <span className="mb-1 block font-bold">Role</span>
          <select
            className="field"
            name="role"
            value={form.role}
            onChange={(e) => setForm({ ...form, role: e.target.value as Role })}
          >
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {ROLE_LABELS[r]}
              </option>
            ))}
          </select>
        </label>
        <label className="block" htmlFor="new-unit">
          <span className="mb-1 block font-bold">Unit</span>
          {needsUnit(form.role) ? (
            unitSelect(form.unitCode, (v) => setForm({ ...form, unitCode: v }), 'new-unit')
          ) : (
            <span className="block py-1.5 text-ink-600 dark:text-ink-300">all units</span>
          )}
          {fields.unitCode && <span className="text-sm text-coral-700 dark:text-coral-300">{fields.unitCode}</span>}
        </label>
        <button className="btn-primary justify-center" type="submit">
          Add person
        </button>
      </form>
      {message && (
        <p role="status" data-testid="staff-message" className="mb-3 rounded bg-glass-50 p-2 dark:bg-glass-900/40">
          {message}
        </p>
      )}
      <div className="overflow-x-auto">
        <table className="stack-table w-full text-sm" data-testid="user-table">
          <thead>
            <tr className="text-left text-ink-500 dark:text-ink-300">
              <th className="py-1">Name</th>
              <th>E-mail</th>
              <th>Role</th>
              <th>Unit</th>
              <th>Access</th>
              <th>Sign-in</th>
              <th>
                <span className="sr-only">Actions</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {data.users.map((user) => {
              const locked = user.locked_until !== null && new Date(user.locked_until).getTime() > now;
              const isEditing = editing === user.id;
              return (
                <tr
                  key={user.id}
                  className="border-t border-ink-100 align-top dark:border-ink-800"
                  data-testid={`user-${user.email}`}
                >
                  <td data-label="Name" className="py-1.5">
                    {user.name}
                  </td>
                  <td data-label="E-mail">{user.email}</td>
                  <td data-label="Role">
                    {isEditing ? (
                      <select
                        aria-label="New role"
                        className="field"
                        value={edit.role}
                        onChange={(e) => setEdit({ ...edit, role: e.target.value as Role })}
                      >
                        {ROLES.map((r) => (
                          <option key={r} value={r}>
                            {ROLE_LABELS[r]}
                          </option>
                        ))}
                      </select>
                    ) : (
                      ROLE_LABELS[user.role]
                    )}
                  </td>
                  <td data-label="Unit">
                    {isEditing
                      ? needsUnit(edit.role)
                        ? unitSelect(edit.unitCode, (v) => setEdit({ ...edit, unitCode: v }), `unit-${user.id}`)
                        : 'all units'
                      : (user.unit_code ?? 'all units')}
                  </td>
                  <td data-label="Access">
                    {user.active ? (
                      user.must_change_password ? (
                        'active · password not yet chosen'
                      ) : (
                        'active'
                      )
                    ) : (
                      <strong>
                        deactivated{user.deactivated_at ? ` ${formatDayTime(user.deactivated_at, timeZone)}` : ''}
                      </strong>
                    )}
                  </td>
                  <td data-label="Sign-in">
                    {locked ? (
                      <strong>locked until {formatDayTime(user.locked_until!, timeZone)}</strong>
                    ) : user.failed_signins > 0 ? (
                      `${user.failed_signins} wrong in a row`
                    ) : user.last_signin_at ? (
                      `last ${formatDayTime(user.last_signin_at, timeZone)}`
                    ) : (
                      'never'
                    )}
                  </td>
                  <td className="space-x-1 whitespace-nowrap py-1">
                    {isEditing ? (
                      <>
                        <button
                          type="button"
                          className="btn-quiet"
                          onClick={async () => {
                            const body = {
                              role: edit.role,
                              unitCode: needsUnit(edit.role) ? edit.unitCode || null : null,
                            };
                            if (
                              await act(`${user.email} changed.`, () =>
                                postJson(`/api/admin/users/${user.id}`, body, 'PATCH'),
                              )
                            )
                              setEditing(null);
                          }}
                        >
                          Save
                        </button>
                        <button type="button" className="btn-quiet" onClick={() => setEditing(null)}>
                          Cancel
                        </button>
                      </>
                    ) : (
                      <>
                        <button
                          type="button"
                          className="btn-quiet"
                          onClick={() => {
                            setEditing(user.id);
                            setEdit({ role: user.role, unitCode: user.unit_code ?? '' });
                          }}
                        >
                          Change role
                        </button>
                        {user.active && (
                          <button
                            type="button"
                            className="btn-quiet"
                            onClick={() =>
                              act(`A set-password link was sent to ${user.email}.`, () =>
                                postJson(`/api/admin/users/${user.id}/send-link`, {}),
                              )
                            }
                          >
                            Send password link
                          </button>
                        )}
                        {user.active ? (
                          <button
                            type="button"
                            className="btn-quiet"
                            onClick={() =>
                              window.confirm(`End ${user.name}'s access now?`) &&
                              act(`${user.email} deactivated; their sessions stop at the next request.`, () =>
                                postJson(`/api/admin/users/${user.id}/deactivate`, {}),
                              )
                            }
                          >
                            Deactivate
                          </button>
                        ) : (
                          <button
                            type="button"
                            className="btn-quiet"
                            onClick={() =>
                              act(`${user.email} reactivated.`, () =>
                                postJson(`/api/admin/users/${user.id}/reactivate`, {}),
                              )
                            }
                          >
                            Reactivate
                          </button>
                        )}
                        {(locked || user.failed_signins > 0) && (
                          <button
                            type="button"
                            className="btn-quiet"
                            onClick={() =>
                              act(`${user.email} unlocked.`, () => postJson(`/api/admin/users/${user.id}/unlock`, {}))
                            }
                          >
                            Unlock
                          </button>
                        )}
                      </>
                    )}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </div>
  );
}
