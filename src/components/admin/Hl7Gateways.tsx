import { useState } from 'react';
import useSWR from 'swr';
import { deleteJson, fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';
import type { GatewayList, GatewayView } from '~/lib/hl7/api-types.ts';
import { formatDateTime } from '~/lib/time/format.ts';

/** Admin: HL7 v2 gateways (known by MSH-3 / MSH-4) and their bed names (PV1-3) mapped to beds. */
export default function Hl7Gateways() {
  const { data, error, mutate } = useSWR<GatewayList>('/api/admin/hl7-gateways', fetchJson);
  const [form, setForm] = useState({ label: '', sendingApplication: '', sendingFacility: '' });
  const actions = useForm();
  const message = actions.alert ?? actions.status;
  const [revoking, setRevoking] = useState<number | null>(null);
  const [reason, setReason] = useState('');
  const [mapping, setMapping] = useState<Record<number, { bedName: string; bedId: string }>>({});
  if (error) return <p role="alert">Could not load gateways: {String((error as Error).message)}</p>;
  if (!data) return <p>Loading gateways…</p>;
  const when = (iso: string | null) => (iso ? formatDateTime(iso, data.timeZone) : '—');
  const units = [...new Set(data.beds.map((b) => b.unitName))];

  const run = (work: () => Promise<unknown>, done: string) => actions.act(done, work, { after: mutate });

  const bedForm = (g: GatewayView) => {
    const m = mapping[g.id] ?? { bedName: '', bedId: '' };
    const set = (patch: Partial<typeof m>) => setMapping({ ...mapping, [g.id]: { ...m, ...patch } });
    return (
      <form
        className="mt-2 flex flex-wrap items-end gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          void run(
            () => postJson(`/api/admin/hl7-gateways/${g.id}/beds`, { bedName: m.bedName, bedId: Number(m.bedId) }),
            `Bed name ${m.bedName} mapped.`,
          ).then((ok) => ok && set({ bedName: '' }));
        }}
      >
        <label className="text-sm font-bold">
          Bed name as sent in PV1-3
          <input
            className="field mt-1 w-48 font-mono"
            value={m.bedName}
            onChange={(e) => set({ bedName: e.target.value })}
            required
            maxLength={120}
            placeholder="ICU4^^B03"
          />
        </label>
        <label className="text-sm font-bold">
          is our bed
          <select className="field mt-1" value={m.bedId} onChange={(e) => set({ bedId: e.target.value })} required>
            <option value="">choose…</option>
            {units.map((u) => (
              <optgroup key={u} label={u}>
                {data.beds
                  .filter((b) => b.unitName === u)
                  .map((b) => (
                    <option key={b.id} value={b.id}>
                      {b.label}
                    </option>
                  ))}
              </optgroup>
            ))}
          </select>
        </label>
        <button type="submit" className="btn-quiet">
          Map bed
        </button>
      </form>
    );
  };

  return (
    <div className="space-y-4" data-testid="hl7-gateways">
      <p className="text-sm">
        {data.mllpPort ? (
          <>
            The MLLP listener takes HL7 v2 on port <strong className="font-mono">{data.mllpPort}</strong>.
          </>
        ) : (
          <>The MLLP listener is off on this host (EBB_MLLP=off).</>
        )}
      </p>
      <form
        className="flex flex-wrap items-end gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          void run(
            () => postJson('/api/admin/hl7-gateways', form),
            `Gateway ${form.label} registered: map its bed names below.`,
          ).then((ok) => ok && setForm({ label: '', sendingApplication: '', sendingFacility: '' }));
        }}
      >
        <label className="text-sm font-bold">
          Gateway
          <input
            className="field mt-1 w-56"
            value={form.label}
            onChange={(e) => setForm({ ...form, label: e.target.value })}
            required
            minLength={2}
            maxLength={80}
            placeholder="e.g. Level 4 monitor gateway"
          />
        </label>
        <label className="text-sm font-bold">
          Sending application (MSH-3)
          <input
            className="field mt-1 w-44 font-mono"
            value={form.sendingApplication}
            onChange={(e) => setForm({ ...form, sendingApplication: e.target.value })}
            required
            maxLength={64}
          />
        </label>
        <label className="text-sm font-bold">
          Sending facility (MSH-4)
          <input
            className="field mt-1 w-44 font-mono"
            value={form.sendingFacility}
            onChange={(e) => setForm({ ...form, sendingFacility: e.target.value })}
            maxLength={64}
          />
        </label>
        <button type="submit" className="btn-primary">
          Register gateway
        </button>
      </form>
      {message && (
        <p role="status" className="text-sm">
          {message}
        </p>
      )}

      {data.gateways.length === 0 && <p>No gateways yet: HL7 messages from any sender are refused (AR).</p>}
      <ul className="space-y-3">
        {data.gateways.map((g) => (
          <li key={g.id} className="rounded-md border border-ink-200 p-3 dark:border-ink-700">
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <h2 className="font-bold">
                {g.label}{' '}
                <span className="font-mono text-sm text-ink-600 dark:text-ink-300">
                  {g.sendingApplication}^{g.sendingFacility}
                </span>
              </h2>
              <span className="text-sm">
                {g.revokedAt
                  ? `revoked ${when(g.revokedAt)}${g.revokedBy ? ` by ${g.revokedBy}` : ''}: ${g.revokeReason}`
                  : 'live'}
              </span>
            </div>
            <p className="text-sm text-ink-600 dark:text-ink-300">
              Registered {when(g.createdAt)}
              {g.createdBy ? ` by ${g.createdBy}` : ''}; last message {when(g.lastMessageAt)}
            </p>
            <table className="stack-table mt-2 w-full text-sm" data-testid="gateway-beds">
              <thead>
                <tr className="text-left text-ink-600 dark:text-ink-300">
                  <th className="py-1">PV1-3 as sent</th>
                  <th>Bed</th>
                  <th>
                    <span className="sr-only">Actions</span>
                  </th>
                </tr>
              </thead>
              <tbody>
                {g.beds.map((b) => (
                  <tr key={b.id} className="border-t border-ink-100 dark:border-ink-800">
                    <td data-label="PV1-3 as sent" className="py-1 font-mono">
                      {b.bedName}
                    </td>
                    <td data-label="Bed">
                      {b.bed.label} <span className="text-ink-600 dark:text-ink-300">{b.bed.unitCode}</span>
                    </td>
                    <td>
                      {!g.revokedAt && (
                        <button
                          type="button"
                          className="btn-quiet"
                          onClick={() =>
                            void run(
                              () => deleteJson(`/api/admin/hl7-gateways/${g.id}/beds/${b.id}`),
                              `Bed name ${b.bedName} unmapped.`,
                            )
                          }
                        >
                          Unmap
                        </button>
                      )}
                    </td>
                  </tr>
                ))}
                {g.beds.length === 0 && (
                  <tr>
                    <td colSpan={3} className="py-1">
                      No beds mapped: every message is refused (AE, unknown bed).
                    </td>
                  </tr>
                )}
              </tbody>
            </table>
            {!g.revokedAt && bedForm(g)}
            {!g.revokedAt && revoking !== g.id && (
              <button
                type="button"
                className="btn-quiet mt-2"
                onClick={() => {
                  setRevoking(g.id);
                  setReason('');
                }}
              >
                Revoke gateway
              </button>
            )}
            {revoking === g.id && (
              <form
                className="mt-2 flex flex-wrap gap-2"
                onSubmit={(e) => {
                  e.preventDefault();
                  void run(
                    () => postJson(`/api/admin/hl7-gateways/${g.id}/revoke`, { reason }),
                    `Gateway ${g.label} revoked: its messages are refused from now on.`,
                  ).then((ok) => ok && setRevoking(null));
                }}
              >
                <input
                  className="field"
                  aria-label="Reason"
                  placeholder="reason"
                  value={reason}
                  onChange={(e) => setReason(e.target.value)}
                  required
                  minLength={2}
                  maxLength={200}
                />
                <button type="submit" className="btn-primary">
                  Revoke
                </button>
                <button type="button" className="btn-quiet" onClick={() => setRevoking(null)}>
                  Keep
                </button>
              </form>
            )}
          </li>
        ))}
      </ul>
    </div>
  );
}
