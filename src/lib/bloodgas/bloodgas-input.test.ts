import { describe, expect, it } from 'vitest';
import { bloodGasInputSchema, gasBounds } from './bloodgas-input.ts';

const now = new Date('2026-12-02T10:00:00Z');
const ok = {
  sampledAt: '2026-12-02T09:30:00Z',
  sampleType: 'arterial',
  gasUnit: 'kPa',
  ph: 7.38,
  pao2: 8.1,
  paco2: 5.6,
  sao2: 91,
  fio2: 0.4,
};
const fields = (body: unknown) => {
  const r = bloodGasInputSchema(now).safeParse(body);
  return r.success ? {} : Object.fromEntries(r.error.issues.map((i) => [i.path.join('.'), i.message]));
};

describe('blood gas input', () => {
  it('accepts a plain arterial gas and takes FiO₂ as a percentage too', () => {
    const r = bloodGasInputSchema(now).parse({ ...ok, fio2: '40', hb: '132', spo2AtSample: '' });
    expect(r.fio2).toBe(0.4);
    expect(r.hb).toBe(13.2); // g/L → g/dL
    expect(r.spo2AtSample).toBeUndefined();
  });
  it('refuses pH outside 6.5–8.0', () => {
    expect(fields({ ...ok, ph: 6.4 }).ph).toMatch(/under 6.5/);
    expect(fields({ ...ok, ph: 8.1 }).ph).toMatch(/over 8/);
  });
  it('refuses pressures outside plausible bounds in the unit typed', () => {
    expect(gasBounds('pao2', 'kPa')).toEqual({ min: 1.3, max: 106.7 });
    expect(fields({ ...ok, pao2: 120 }).pao2).toMatch(/over 106.7 kPa/);
    expect(fields({ ...ok, gasUnit: 'mmHg', pao2: 120, paco2: 40 })).toEqual({});
    expect(fields({ ...ok, gasUnit: 'mmHg', paco2: 2 }).paco2).toMatch(/under 5 mmHg/);
  });
  it('refuses SaO₂ over 100 % and a missing FiO₂', () => {
    expect(fields({ ...ok, sao2: 101 }).sao2).toMatch(/over 100/);
    expect(fields({ ...ok, fio2: '' }).fio2).toMatch(/FiO₂/);
  });
  it('refuses a sample time in the future', () => {
    expect(fields({ ...ok, sampledAt: '2026-12-02T10:05:00Z' }).sampledAt).toMatch(/future/);
  });
  it('refuses an unknown sample type and gas unit', () => {
    const f = fields({ ...ok, sampleType: 'mixed', gasUnit: 'atm' });
    expect(f.sampleType).toMatch(/sample type/);
    expect(f.gasUnit).toMatch(/kPa or mmHg/);
  });
});
