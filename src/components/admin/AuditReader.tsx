import useSWR from 'swr';
import { useState } from 'react';
import { fetchJson } from '~/lib/client/fetch-json.ts';
import { formatCount } from '~/lib/time/format.ts';
import { changedKeys, type AuditRowView } from '~/lib/audit/reader.ts';
import type { StaffListItem } from '~/lib/staff/api-types.ts';

interface AuditPage {
  rows: AuditRowView[];
  total: number;
  page: number;
  pageSize: number;
  timeZone: string;
  unitCode: string | null;
  actions: string[];
}
interface Filters {
  actorId: string;
  patient: string;
  action: string;
  from: string;
  to: string;
  unit: string;
}

function Side({ value, changed }: { value: unknown; changed: string[] }) {
  if (value === null || value === undefined) return <span className="text-ink-500">—</span>;
  if (typeof value !== 'object') return <span>{String(value)}</span>;
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-2 text-xs">
      {Object.entries(value as Record<string, unknown>).map(([k, v]) => (
        <div key={k} className="contents">
          <dt className={changed.includes(k) ? 'font-bold' : 'text-ink-500 dark:text-ink-300'}>
            {k}
            {changed.includes(k) ? ' •' : ''}
          </dt>
          <dd className="break-all">{typeof v === 'object' ? JSON.stringify(v) : String(v)}</dd>
        </div>
      ))}
    </dl>
  );
}

/** Who did what and when: filters, before and after side by side, paging, CSV of the filtered rows. */
export default function AuditReader({ units }: { units: { code: string; name: string }[] }) {
  const [draft, setDraft] = useState<Filters>({
    actorId: '',
    patient: '',
    action: '',
    from: '',
    to: '',
    unit: units[0]?.code ?? '',
  });
  const [filters, setFilters] = useState<Filters>(draft);
  const [page, setPage] = useState(1);
  const params = new URLSearchParams(Object.entries(filters).filter(([, v]) => v !== ''));
  const url = `/api/admin/audit?${params}&page=${page}&pageSize=25`;
  const { data, error } = useSWR<AuditPage>(url, fetchJson);
  const { data: staff } = useSWR<{ users: StaffListItem[] }>('/api/admin/users', fetchJson);
  const pages = data ? Math.max(1, Math.ceil(data.total / data.pageSize)) : 1;
  const set = (k: keyof Filters) => (e: React.ChangeEvent<HTMLInputElement | HTMLSelectElement>) =>
    setDraft({ ...draft, [k]: e.target.value });

  return (
    <div>
      <form
        className="panel mb-4 grid gap-3 md:grid-cols-7 md:items-end"
        data-testid="audit-filters"
        onSubmit={(e) => {
          e.preventDefault();
          setFilters(draft);
          setPage(1);
        }}
      >
        <label className="block">
          <span className="mb-1 block text-sm font-bold">Person</span>
          <select className="field" value={draft.actorId} onChange={set('actorId')}>
            <option value="">anyone</option>
            {staff?.users.map((u) => (
              <option key={u.id} value={u.id}>
                {u.name} ({u.email})
              </option>
            ))}
          </select>
        </label>
        <label className="block">
          <span className="mb-1 block text-sm font-bold">Patient MRN</span>
          <input className="field" value={draft.patient} onChange={set('patient')} />
        </label>
        <label className="block">
          <span className="mb-1 block text-sm font-bold">Action</span>
          <select className="field" value={draft.action} onChange={set('action')}>
            <option value="">any</option>
            {data?.actions.map((a) => (
              <option key={a} value={a}>
                {a}
              </option>
            ))}
          </select>
        </label>
        <label className="block">
          <span className="mb-1 block text-sm font-bold">From (day)</span>
          <input
            className="field"
            placeholder="YYYY-MM-DD"
            inputMode="numeric"
            value={draft.from}
            onChange={set('from')}
          />
        </label>
        <label className="block">
          <span className="mb-1 block text-sm font-bold">To (day)</span>
          <input className="field" placeholder="YYYY-MM-DD" inputMode="numeric" value={draft.to} onChange={set('to')} />
        </label>
        <label className="block">
          <span className="mb-1 block text-sm font-bold">Times of unit</span>
          <select className="field" value={draft.unit} onChange={set('unit')}>
            {units.map((u) => (
              <option key={u.code} value={u.code}>
                {u.name}
              </option>
            ))}
          </select>
        </label>
        <button className="btn-primary justify-center" type="submit">
          Show
        </button>
      </form>
      {error && <p role="alert">Could not read the audit log: {String((error as Error).message)}</p>}
      {data && (
        <>
          <div className="mb-2 flex flex-wrap items-center gap-3 text-sm">
            <span data-testid="audit-total">
              {formatCount(data.total)} entries · times in {data.timeZone}
            </span>
            <a className="btn-quiet" href={`/api/admin/audit?${params}&format=csv`} download data-testid="audit-csv">
              Download CSV
            </a>
            <span className="ml-auto flex items-center gap-2">
              <button type="button" className="btn-quiet" disabled={page <= 1} onClick={() => setPage(page - 1)}>
                Newer
              </button>
              <span>
                page {page} of {pages}
              </span>
              <button type="button" className="btn-quiet" disabled={page >= pages} onClick={() => setPage(page + 1)}>
                Older
              </button>
            </span>
          </div>
          <div className="overflow-x-auto">
            <table className="stack-table w-full text-sm" data-testid="audit-table">
              <thead>
                <tr className="text-left text-ink-500 dark:text-ink-300">
                  <th className="py-1">When</th>
                  <th>Who</th>
                  <th>Action</th>
                  <th>What</th>
                  <th>Before</th>
                  <th>After</th>
                </tr>
              </thead>
              <tbody>
                {data.rows.map((r) => {
                  const changed = changedKeys(r.before, r.after);
                  return (
                    <tr key={r.id} className="border-t border-ink-100 align-top dark:border-ink-800">
                      <td data-label="When" className="whitespace-nowrap py-1.5">
                        {r.atLocal}
                      </td>
                      <td data-label="Who">{r.actorName ?? 'system'}</td>
                      <td data-label="Action" className="font-mono text-xs">
                        {r.action}
                      </td>
                      <td data-label="What">
                        {r.entity} {r.entityId}
                      </td>
                      <td data-label="Before">
                        <Side value={r.before} changed={changed} />
                      </td>
                      <td data-label="After">
                        <Side value={r.after} changed={changed} />
                      </td>
                    </tr>
                  );
                })}
                {data.rows.length === 0 && (
                  <tr>
                    <td colSpan={6} className="py-3 text-ink-600 dark:text-ink-300">
                      No entries match.
                    </td>
                  </tr>
                )}
              </tbody>
            </table>
          </div>
        </>
      )}
    </div>
  );
}
