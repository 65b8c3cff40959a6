import { useState } from 'react';
import useSWR from 'swr';
import { fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { useForm } from '~/lib/client/use-form.ts';
import { formatDateTime } from '~/lib/time/format.ts';
import type { DeviceKeyView } from '~/lib/devices/api-types.ts';

interface ListResponse {
  keys: DeviceKeyView[];
  beds: { id: number; label: string; unitCode: string; unitName: string }[];
}

const whenIn = (timeZone: string) => (iso: string | null) => (iso ? formatDateTime(iso, timeZone) : '—');

/** Admin: device keys for bedside-monitor gateways (one bed each); a new key is shown once. */
export default function DeviceKeys({ timeZone }: { timeZone: string }) {
  const when = whenIn(timeZone);
  const { data, error, mutate } = useSWR<ListResponse>('/api/admin/device-keys', fetchJson);
  const [bedId, setBedId] = useState('');
  const [label, setLabel] = useState('');
  const [fresh, setFresh] = useState<{ key: string; label: string; bed: string } | null>(null);
  const actions = useForm();
  const message = actions.alert ?? actions.status;
  const [revoking, setRevoking] = useState<number | null>(null);
  const [reason, setReason] = useState('');
  if (error) return <p role="alert">Could not load device keys: {String((error as Error).message)}</p>;
  if (!data) return <p>Loading device keys…</p>;

  const units = [...new Set(data.beds.map((b) => b.unitName))];

  async function create(e: React.FormEvent) {
    e.preventDefault();
    const res = await actions.submit(() =>
      postJson<{ key: string; deviceKey: DeviceKeyView }>('/api/admin/device-keys', { bedId: Number(bedId), label }),
    );
    if (res === undefined) return;
    setFresh({ key: res.key, label: res.deviceKey.label, bed: res.deviceKey.bed.label });
    setLabel('');
    await mutate();
  }

  async function revoke(id: number) {
    if (
      !(await actions.act(
        `Key ${id} revoked: its gateway is refused from now on.`,
        () => postJson(`/api/admin/device-keys/${id}/revoke`, { reason }),
        { after: mutate },
      ))
    )
      return;
    setRevoking(null);
    setReason('');
  }

  return (
    <div className="space-y-4">
      <form className="flex flex-wrap items-end gap-3" onSubmit={create}>
        <label className="text-sm font-bold">
          Bed
          <select className="field mt-1" value={bedId} onChange={(e) => setBedId(e.target.value)} required>
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
        <label className="text-sm font-bold">
          Gateway or monitor
          <input
            className="field mt-1 w-64"
            value={label}
            onChange={(e) => setLabel(e.target.value)}
            required
            minLength={2}
            maxLength={80}
            placeholder="e.g. bay 2 gateway, east wall"
          />
        </label>
        <button type="submit" className="btn-primary">
          Create key
        </button>
      </form>

      {fresh && (
        <div role="status" className="rounded-md border-2 border-glass-500 bg-glass-50 p-3 dark:bg-glass-900/40">
          <p className="font-bold">
            New key for bed {fresh.bed} ({fresh.label}). It is shown this once: put it in the gateway now.
          </p>
          <code
            className="mt-1 block break-all rounded bg-white p-2 font-mono text-sm dark:bg-ink-950"
            data-testid="new-device-key"
          >
            {fresh.key}
          </code>
          <div className="mt-2 flex gap-2">
            <button type="button" className="btn-quiet" onClick={() => navigator.clipboard?.writeText(fresh.key)}>
              Copy
            </button>
            <button type="button" className="btn-quiet" onClick={() => setFresh(null)}>
              Done, hide it
            </button>
          </div>
        </div>
      )}
      {message && (
        <p role="status" className="text-sm">
          {message}
        </p>
      )}

      {data.keys.length === 0 && (
        <p data-testid="no-device-keys">
          No device keys yet: readings posted to /api/ingest are refused until a key is made for a bed.
        </p>
      )}
      <table className="stack-table w-full text-sm" data-testid="device-key-table">
        <thead>
          <tr className="text-left text-ink-500">
            <th className="py-1">Key</th>
            <th>Bed</th>
            <th>Gateway</th>
            <th>Created</th>
            <th>Last used</th>
            <th>State</th>
            <th>
              <span className="sr-only">Actions</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {data.keys.map((k) => (
            <tr key={k.id} className="border-t border-ink-100 align-top dark:border-ink-800">
              <td data-label="Key" className="py-1.5 font-mono">
                {k.prefix}…
              </td>
              <td data-label="Bed">
                {k.bed.label} <span className="text-ink-500">{k.bed.unitCode}</span>
              </td>
              <td data-label="Gateway">{k.label}</td>
              <td data-label="Created">
                {when(k.createdAt)}
                {k.createdBy ? ` by ${k.createdBy}` : ''}
              </td>
              <td data-label="Last used">{when(k.lastUsedAt)}</td>
              <td data-label="State">
                {k.revokedAt ? (
                  <span>
                    revoked {when(k.revokedAt)}
                    {k.revokedBy ? ` by ${k.revokedBy}` : ''}: {k.revokeReason}
                  </span>
                ) : (
                  'live'
                )}
              </td>
              <td>
                {!k.revokedAt && revoking !== k.id && (
                  <button
                    type="button"
                    className="btn-quiet"
                    onClick={() => {
                      setRevoking(k.id);
                      setReason('');
                    }}
                  >
                    Revoke
                  </button>
                )}
                {revoking === k.id && (
                  <form
                    className="flex flex-col gap-1"
                    onSubmit={(e) => {
                      e.preventDefault();
                      void revoke(k.id);
                    }}
                  >
                    <input
                      className="field"
                      aria-label="Reason"
                      placeholder="reason"
                      value={reason}
                      onChange={(e) => setReason(e.target.value)}
                      required
                      minLength={3}
                      maxLength={200}
                    />
                    <span className="flex gap-1">
                      <button type="submit" className="btn-primary">
                        Revoke key
                      </button>
                      <button type="button" className="btn-quiet" onClick={() => setRevoking(null)}>
                        Keep
                      </button>
                    </span>
                  </form>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
