import { describe, expect, it, vi } from 'vitest';
import { recordSent } from './outbox-worker.ts';

// The drill found this: a mail went out, then recording "sent" hit a pool timeout during a
// failover, and the row went back to pending and out again. Once delivered, the row is recorded
// patiently and never handed back for another send.
const poolTimeout = () =>
  Object.assign(new Error('Knex: Timeout acquiring a connection'), { name: 'KnexTimeoutError' });
const lostConnection = () =>
  Object.assign(new Error('Connection lost: The server closed the connection.'), { code: 'PROTOCOL_CONNECTION_LOST' });

describe('recording a delivered mail', () => {
  it('keeps trying through a failover until "sent" is recorded', async () => {
    const mark = vi
      .fn()
      .mockRejectedValueOnce(poolTimeout())
      .mockRejectedValueOnce(lostConnection())
      .mockResolvedValueOnce(undefined);
    await expect(recordSent(7, 'w1', '<k@ebbwatch.invalid>', { mark, patienceMs: 5_000 })).resolves.toBe(true);
    expect(mark).toHaveBeenCalledTimes(3);
    expect(mark.mock.calls.every(([id, worker]) => id === 7 && worker === 'w1')).toBe(true);
  });

  it('gives up after its patience, without raising (the claim then lapses; the Message-ID stays the same)', async () => {
    const mark = vi.fn().mockRejectedValue(poolTimeout());
    const quiet = vi.spyOn(console, 'error').mockImplementation(() => {});
    await expect(recordSent(7, 'w1', '<k@ebbwatch.invalid>', { mark, patienceMs: 200 })).resolves.toBe(false);
    expect(mark.mock.calls.length).toBeGreaterThan(1);
    quiet.mockRestore();
  });

  it('does not re-try an error that is not a passing database fault', async () => {
    const mark = vi.fn().mockRejectedValue(new Error('syntax error'));
    const quiet = vi.spyOn(console, 'error').mockImplementation(() => {});
    await expect(recordSent(7, 'w1', '<k@ebbwatch.invalid>', { mark, patienceMs: 5_000 })).resolves.toBe(false);
    expect(mark).toHaveBeenCalledTimes(1);
    quiet.mockRestore();
  });
});
