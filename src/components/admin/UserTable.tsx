import useSWR from 'swr';
import { useState } from 'react';
import { fetchJson, postJson } from '~/lib/client/fetch-json.ts';
import { formatDayTime } from '~/lib/time/format.ts';

interface UserListItem {
  id: number; email: string; name: string; role: string; unit_code: string | null; active: boolean;
  failed_signins: number; locked_until: string | null; last_signin_at: string | null;
}

/** Admin list of accounts, with unlock for those locked after repeated wrong passwords. */
export default function UserTable({ timeZone }: { timeZone: string }) {
  const { data, error, mutate } = useSWR<{ users: UserListItem[] }>('/api/admin/users', fetchJson);
  const [message, setMessage] = useState<string | null>(null);
  if (error) return <p role="alert">Could not load users: {String(error.message ?? error)}</p>;
  if (!data) return <p>Loading users…</p>;
  const now = Date.now();

  async function unlock(user: UserListItem) {
    try {
      await postJson(`/api/admin/users/${user.id}/unlock`, {});
      setMessage(`${user.email} unlocked.`);
      await mutate();
    } catch (err) {
      setMessage(`Unlock failed: ${(err as Error).message}`);
    }
  }

  return (
    <div>
      {message && <p role="status" className="mb-3 rounded bg-glass-50 p-2 dark:bg-glass-900/40">{message}</p>}
      <table className="w-full text-sm" data-testid="user-table">
        <thead>
          <tr className="text-left text-ink-500"><th className="py-1">Name</th><th>Email</th><th>Role</th><th>Unit</th><th>Sign-in</th><th /></tr>
        </thead>
        <tbody>
          {data.users.map((user) => {
            const locked = user.locked_until !== null && new Date(user.locked_until).getTime() > now;
            return (
              <tr key={user.id} className="border-t border-ink-100 dark:border-ink-800">
                <td className="py-1.5">{user.name}{!user.active && ' (inactive)'}</td>
                <td>{user.email}</td>
                <td>{user.role}</td>
                <td>{user.unit_code ?? 'all units'}</td>
                <td>{locked ? <strong>locked until {formatDayTime(user.locked_until!, timeZone)}</strong> : user.failed_signins > 0 ? `${user.failed_signins} wrong in a row` : 'ok'}</td>
                <td>{(locked || user.failed_signins > 0) && <button className="btn-quiet" onClick={() => unlock(user)}>Unlock</button>}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
