import { describe, expect, it } from 'vitest';
import { TrendFileError, groupRefusals, parseTrendCsv } from './trend-csv.ts';
import { guessMapping, headerNames, mappingFits, trendMappingSchema } from './mapping.ts';

const mapping = (extra: Record<string, unknown> = {}) =>
  trendMappingSchema.parse({
    time: 'Time',
    spo2: 'SpO2',
    heartRate: 'HR',
    perfusionIndex: 'PI',
    quality: 'Quality',
    timeMode: 'iso',
    ...extra,
  });

describe('trend upload: unfit columns and grouped refusals (issue 10 point 10)', () => {
  it('names a mapped column whose values do not fit, with examples, and offers to unmap only optional ones', () => {
    const lines = ['Time,SpO2,HR,Status'];
    for (let i = 0; i < 10; i++) lines.push(`2026-12-01T10:00:0${i}Z,95,80,${i % 2 ? 'ok' : 'OK'}`);
    const p = parseTrendCsv(lines.join('\n'), mapping({ perfusionIndex: '', quality: 'Status' }), 'Europe/London');
    expect(p.rows).toHaveLength(0);
    expect(p.unfitColumns).toEqual([
      { field: 'quality', column: 'Status', refused: 10, examples: ['OK', 'ok'], canUnmap: true },
    ]);
    // Unmapped, the same file is all readable.
    expect(
      parseTrendCsv(lines.join('\n'), mapping({ perfusionIndex: '', quality: '' }), 'Europe/London').rows,
    ).toHaveLength(10);
    const hr = parseTrendCsv(
      'Time,SpO2,HR\n2026-12-01T10:00:00Z,95,fast\n',
      mapping({ perfusionIndex: '', quality: '' }),
      'Europe/London',
    );
    expect(hr.unfitColumns).toEqual([
      { field: 'heartRate', column: 'HR', refused: 1, examples: ['fast'], canUnmap: false },
    ]);
  });

  it('a few bad values do not make a column unfit', () => {
    const csv = 'Time,SpO2,HR\n2026-12-01T10:00:00Z,95,80\n2026-12-01T10:00:01Z,95,80\n2026-12-01T10:00:02Z,95,x\n';
    expect(parseTrendCsv(csv, mapping({ perfusionIndex: '', quality: '' }), 'Europe/London').unfitColumns).toEqual([]);
  });

  it('groups refused lines by reason, largest first, with counts and the first line numbers', () => {
    const lines = ['Time,SpO2,HR'];
    for (let i = 0; i < 8; i++) lines.push(`2026-12-01T10:00:0${i}Z,${101 + i},80`); // lines 2–9: over 100
    lines.push('nonsense,95,80', 'later,95,80'); // lines 10, 11
    const p = parseTrendCsv(lines.join('\n'), mapping({ perfusionIndex: '', quality: '' }), 'Europe/London');
    expect(groupRefusals(p.refused, 3)).toEqual([
      { reason: 'SpO₂ over 100 %', field: 'spo2', count: 8, firstLines: [2, 3, 4] },
      { reason: 'time is not a date and time this import understands', field: 'time', count: 2, firstLines: [10, 11] },
    ]);
  });
});

describe('trend file parsing', () => {
  it('reads mapped columns in any order and ignores the rest', () => {
    const csv =
      'HR,Extra,SpO2,Time,PI,Quality\n88,x,95,2026-12-01T10:00:00Z,1.5,clean\n90,y,93,2026-12-01T10:00:01Z,,weak\n';
    const p = parseTrendCsv(csv, mapping(), 'Europe/London');
    expect(p.rowCount).toBe(2);
    expect(p.refused).toEqual([]);
    expect(p.rows).toEqual([
      { line: 2, at: Date.UTC(2026, 11, 1, 10, 0, 0), spo2: 95, heartRate: 88, perfusionIndex: 1.5, trace: 'clean' },
      { line: 3, at: Date.UTC(2026, 11, 1, 10, 0, 1), spo2: 93, heartRate: 90, perfusionIndex: null, trace: 'weak' },
    ]);
  });

  it('refuses bad rows with their line numbers and reasons, keeping the good ones', () => {
    const csv = [
      'Time,SpO2,HR,PI,Quality',
      '2026-12-01T10:00:00Z,95,80,1,clean', // 2
      '', // 3 blank: skipped, still counted as a line
      '2026-12-01T10:00:01Z,101,80,1,clean', // 4
      'yesterday,95,80,1,clean', // 5
      '2026-12-01T10:00:03Z,95.5,80,1,clean', // 6
      '2026-12-01T10:00:04Z,95,80,1,fuzzy', // 7
      '2026-12-01T10:00:00Z,94,80,1,clean', // 8 same time as line 2
      '2026-12-01 10:00:06,94,80,1,clean', // 9 no offset in ISO mode
      '2026-12-01T10:00:07Z,--,--,,', // 10 nothing
      '2026-12-01T10:00:08Z,--,77,,absent', // 11 fine: probe off with a pulse
    ].join('\n');
    const p = parseTrendCsv(csv, mapping(), 'Europe/London');
    expect(p.rows.map((r) => r.line)).toEqual([2, 11]);
    expect(p.refused.map((r) => r.line)).toEqual([4, 5, 6, 7, 8, 9, 10]);
    expect(p.refused[0]!.reason).toMatch(/SpO₂ 101 is over 100/);
    expect(p.refused[1]!.reason).toMatch(/not a date and time/);
    expect(p.refused[2]!.reason).toMatch(/whole number/);
    expect(p.refused[3]!.reason).toMatch(/quality "fuzzy"/);
    expect(p.refused[4]!.reason).toBe('same time as line 2');
    expect(p.refused[5]!.reason).toMatch(/no offset/);
    expect(p.refused[6]!.reason).toMatch(/no SpO₂ and no heart rate/);
  });

  it('reads unit local time across the autumn change, in file order, with one note per pass', () => {
    // 25 Oct 2026, Europe/London: 01:00–01:59 happens twice. A reading every 30 min from 00:30.
    const times = [
      '2026-10-25 00:30:00',
      '2026-10-25 01:00:00',
      '2026-10-25 01:30:00',
      '2026-10-25 01:00:00',
      '2026-10-25 01:30:00',
      '2026-10-25 02:00:00',
    ];
    const csv = ['Time,SpO2,HR', ...times.map((t) => `${t},95,80`)].join('\n');
    const p = parseTrendCsv(csv, mapping({ perfusionIndex: '', quality: '', timeMode: 'local' }), 'Europe/London');
    expect(p.refused).toEqual([]);
    expect(p.rows.map((r) => new Date(r.at).toISOString())).toEqual([
      '2026-10-24T23:30:00.000Z',
      '2026-10-25T00:00:00.000Z',
      '2026-10-25T00:30:00.000Z',
      '2026-10-25T01:00:00.000Z',
      '2026-10-25T01:30:00.000Z',
      '2026-10-25T02:00:00.000Z',
    ]);
    expect(p.notes.map((n) => n.line)).toEqual([3, 5]);
  });

  it('refuses the spring hour that does not exist, naming the line, and reads day-first dates', () => {
    const csv = 'Time,SpO2,HR\n29/03/2026 00:59:00,95,80\n29/03/2026 01:30:00,95,80\n29/03/2026 02:00:00,95,80\n';
    const p = parseTrendCsv(csv, mapping({ perfusionIndex: null, quality: null, timeMode: 'local' }), 'Europe/London');
    expect(p.rows.map((r) => new Date(r.at).toISOString())).toEqual([
      '2026-03-29T00:59:00.000Z',
      '2026-03-29T01:00:00.000Z',
    ]);
    expect(p.refused).toMatchObject([
      { line: 3, reason: 'time 2026-03-29 01:30:00 does not exist in Europe/London (the clocks went forward)' },
    ]);
  });

  it('refuses the whole file when a mapped column is missing or there is no header', () => {
    expect(() => parseTrendCsv('Time,SpO2\n2026-12-01T10:00:00Z,95\n', mapping(), 'UTC')).toThrow(TrendFileError);
    expect(() => parseTrendCsv('\n\n', mapping(), 'UTC')).toThrow(/header/);
  });

  it('counts lines through quoted line breaks and blank lines', () => {
    const csv =
      'Time,SpO2,HR\n2026-12-01T10:00:00Z,95,"80"\n\n"2026-12-01T10:00:01Z",x,"a\nb"\n2026-12-01T10:00:02Z,101,80\n';
    const p = parseTrendCsv(csv, mapping({ perfusionIndex: null, quality: null }), 'UTC');
    expect(p.rowCount).toBe(3);
    expect(p.refused.map((r) => r.line)).toEqual([4, 6]);
  });

  it('reads semicolon files and a byte-order mark', () => {
    const p = parseTrendCsv(
      '\uFEFFTime;SpO2;HR\n2026-12-01T10:00:00+01:00;97;70\n',
      mapping({ perfusionIndex: null, quality: null }),
      'UTC',
    );
    expect(p.rows[0]!.at).toBe(Date.UTC(2026, 11, 1, 9));
  });
});

describe('column mapping', () => {
  it('guesses from header names and checks a remembered mapping fits', () => {
    const headers = headerNames('"Date Time",SpO2 (%),Pulse Rate,PI,Signal\r\n1,2,3');
    expect(headers).toEqual(['Date Time', 'SpO2 (%)', 'Pulse Rate', 'PI', 'Signal']);
    expect(guessMapping(headers)).toEqual({
      time: 'Date Time',
      spo2: 'SpO2 (%)',
      heartRate: 'Pulse Rate',
      perfusionIndex: 'PI',
      quality: 'Signal',
    });
    expect(mappingFits(mapping(), headers)).toBe(false);
    expect(
      mappingFits(
        mapping({
          time: 'Date Time',
          spo2: 'SpO2 (%)',
          heartRate: 'Pulse Rate',
          perfusionIndex: 'PI',
          quality: 'Signal',
        }),
        headers,
      ),
    ).toBe(true);
  });

  it('refuses one column used twice', () => {
    const r = trendMappingSchema.safeParse({ time: 'A', spo2: 'A', heartRate: 'B', timeMode: 'iso' });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]!.path).toEqual(['spo2']);
  });
});
