import { describe, expect, it } from 'vitest';
import { parseWallEntry, toWallEntry } from './wall-clock.ts';

describe('typed wall-clock entry in the unit zone (issue 10 point 8)', () => {
  it('shows an instant as the unit-zone date and 24-hour time, whatever the process zone', () => {
    expect(toWallEntry(Date.UTC(2026, 11, 2, 6, 14, 59), 'Europe/London')).toEqual({
      date: '2026-12-02',
      time: '06:14',
    });
    expect(toWallEntry(Date.UTC(2026, 11, 2, 6, 14), 'America/New_York')).toEqual({
      date: '2026-12-02',
      time: '01:14',
    });
    expect(toWallEntry(Date.UTC(2026, 6, 2, 22, 30), 'Europe/London')).toEqual({ date: '2026-07-02', time: '23:30' });
  });

  it('reads what a nurse types, in the unit zone', () => {
    const at = Date.UTC(2026, 11, 2, 6, 14);
    for (const time of ['06:14', '6:14', '0614', '06.14', ' 06:14 '])
      expect(parseWallEntry({ date: '2026-12-02', time }, 'Europe/London')).toEqual({ at: new Date(at) });
    expect(parseWallEntry({ date: '02/12/2026', time: '06:14' }, 'Europe/London')).toEqual({ at: new Date(at) }); // day first: 2 December
    expect(parseWallEntry({ date: '2026-07-02', time: '23:30' }, 'Europe/London')).toEqual({
      at: new Date(Date.UTC(2026, 6, 2, 22, 30)),
    }); // BST
    expect(parseWallEntry({ date: '2026-12-02', time: '01:14' }, 'America/New_York')).toEqual({ at: new Date(at) });
  });

  it('refuses what is not a time or a day, and the spring gap; reads the autumn repeat as its first pass', () => {
    expect(parseWallEntry({ date: '2026-12-02', time: '6:14 PM' }, 'Europe/London')).toEqual({
      error: 'Time taken must be a 24-hour time such as 06:14',
    });
    expect(parseWallEntry({ date: '2026-12-02', time: '24:00' }, 'Europe/London')).toHaveProperty('error');
    expect(parseWallEntry({ date: '12/02/2026x', time: '06:14' }, 'Europe/London')).toHaveProperty('error');
    expect(parseWallEntry({ date: '2026-02-30', time: '06:14' }, 'Europe/London')).toEqual({
      error: 'Date taken is not a day of the calendar',
    });
    expect(parseWallEntry({ date: '2026-03-29', time: '01:30' }, 'Europe/London')).toEqual({
      error: '01:30 did not happen that day in Europe/London (the clocks went forward)',
    });
    // 25 Oct 2026 01:30 happens twice in London: first pass is BST (00:30 UTC).
    expect(parseWallEntry({ date: '2026-10-25', time: '01:30' }, 'Europe/London')).toEqual({
      at: new Date(Date.UTC(2026, 9, 25, 0, 30)),
    });
  });
});
