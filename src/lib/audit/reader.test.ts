import { describe, expect, it } from 'vitest';
import { auditCsv, auditQuerySchema, changedKeys, csvCell } from './reader.ts';

describe('audit reader', () => {
  it('quotes CSV cells per RFC 4180 and defuses spreadsheet formulas', () => {
    expect(csvCell('plain')).toBe('plain');
    expect(csvCell('a,b')).toBe('"a,b"');
    expect(csvCell('say "hi"')).toBe('"say ""hi"""');
    expect(csvCell('=HYPERLINK("x")')).toBe(`"'=HYPERLINK(""x"")"`);
    expect(csvCell({ a: 1 })).toBe('"{""a"":1}"');
    expect(csvCell(null)).toBe('');
  });

  it('writes times in the given zone, 24-hour, day first', () => {
    const csv = auditCsv(
      [
        {
          id: 1,
          at: '2026-07-02T05:14:09.000Z',
          atLocal: '',
          actorId: 3,
          actorName: 'Ana Lim',
          actorEmail: 'ana@x.example',
          action: 'user.create',
          entity: 'user',
          entityId: '9',
          before: null,
          after: { role: 'nurse' },
        },
      ],
      'Europe/London',
    );
    const [head, row] = csv.trim().split('\r\n');
    expect(head).toBe('time (Europe/London),person,e-mail,action,entity,entity id,before,after');
    // 05:14 UTC is 06:14 in London in July (BST, UTC+1).
    expect(row).toBe('2 Jul 2026 06:14:09,Ana Lim,ana@x.example,user.create,user,9,,"{""role"":""nurse""}"');
  });

  it('names the changed keys for side-by-side display', () => {
    expect(changedKeys({ role: 'nurse', name: 'A' }, { role: 'charge', name: 'A' })).toEqual(['role']);
    expect(changedKeys(null, { active: false })).toEqual(['active']);
  });

  it('refuses an end date before the start date, naming the field', () => {
    const r = auditQuerySchema.safeParse({ from: '2026-12-02', to: '2026-12-01' });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].path).toEqual(['to']);
  });
});

describe('audit day filters', () => {
  it('refuses days that are not on the calendar', () => {
    expect(auditQuerySchema.safeParse({ from: '2026-13-01' }).success).toBe(false);
    expect(auditQuerySchema.safeParse({ from: '2026-02-30' }).success).toBe(false);
    expect(auditQuerySchema.safeParse({ from: '2028-02-29' }).success).toBe(true);
  });
});
