import { describe, expect, it } from 'vitest';
import type { ZodError } from 'zod';
import { obsInputSchema } from '~/lib/charting/obs-input.ts';
import { admitSchema, idParam } from '~/lib/charting/patient-input.ts';
import { strictJsonSchema, strictTextSchema } from './strict-input.ts';
import { zodFields } from './http.ts';

const now = new Date('2026-12-02T10:00:00Z');
const obs = { takenAt: '2026-12-02T09:30:00Z', spo2: 95, device: 'room_air', trace: 'clean' };
const fieldsOf = (fn: () => unknown) => {
  try {
    fn();
  } catch (err) {
    return zodFields(err as ZodError);
  }
  throw new Error('expected a refusal');
};

describe('strict JSON input', () => {
  const strict = strictJsonSchema(obsInputSchema(now));
  it('takes numbers as numbers only', () => {
    expect(strict.parse(obs).spo2).toBe(95);
    for (const bad of ['0x5F', '95', [95], true]) {
      expect(fieldsOf(() => strict.parse({ ...obs, spo2: bad }))).toEqual({ spo2: 'SpO₂ must be a number' });
    }
    // The lenient form schema still reads what a form field gives.
    expect(obsInputSchema(now).parse({ ...obs, spo2: '95' }).spo2).toBe(95);
  });
  it('names an unknown field', () => {
    expect(fieldsOf(() => strict.parse({ ...obs, heartrate: 80 }))).toEqual({
      heartrate: 'is not a field this route takes',
    });
  });
  it('refuses impossible dates and times without a zone', () => {
    expect(Object.keys(fieldsOf(() => strict.parse({ ...obs, takenAt: '2026-11-31T09:30:00Z' })))).toEqual(['takenAt']);
    expect(Object.keys(fieldsOf(() => strict.parse({ ...obs, takenAt: 1764667800000 })))).toEqual(['takenAt']);
  });
  it('normalises text to NFC', () => {
    const decomposed = 'Zoe\u0301';
    const out = strictJsonSchema(admitSchema).parse({
      givenName: decomposed,
      familyName: 'Ng',
      mrn: 'X123',
      dateOfBirth: '1960-01-02',
      bedId: 1,
    });
    expect(out.givenName).toBe('Zoé');
    expect(out.givenName).toBe('Zoé'.normalize('NFC'));
  });
});

describe('strict text input (query and path)', () => {
  const ids = strictTextSchema(idParam);
  it('reads plain decimals only', () => {
    expect(ids.parse({ id: '16' }).id).toBe(16);
    for (const bad of ['0x10', '1e1', ' 16', '16abc', '']) expect(() => ids.parse({ id: bad }), bad).toThrow();
  });
});
