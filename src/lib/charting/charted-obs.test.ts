import { describe, expect, it } from 'vitest';
import { news2 } from '~/lib/oxygenation/news2.ts';
import { news2InputOf, type ChartedObs } from './charted-obs.ts';

const obs: ChartedObs = {
  at: 0,
  spo2: 95,
  heartRate: 80,
  respRate: 16,
  fio2: 0.28,
  fio2Estimated: true,
  device: 'nasal_cannula',
  systolic: 120,
  temperature: 37,
  consciousness: 'alert',
};

describe('news2InputOf', () => {
  it('maps every NEWS2 parameter from the charted obs', () => {
    expect(news2InputOf(obs)).toEqual({
      respRate: 16,
      spo2: 95,
      onOxygen: true,
      systolic: 120,
      pulse: 80,
      temperature: 37,
      consciousness: 'alert',
    });
  });
  it('reads room air as not on oxygen and an absent device as unknown', () => {
    expect(news2InputOf({ ...obs, device: 'room_air' }).onOxygen).toBe(false);
    expect(news2InputOf({ ...obs, device: null }).onOxygen).toBeNull();
  });
  it('gives a complete NEWS2 when everything is charted', () => {
    // RCP NEWS2 (2017) chart 1: RR 12–20 → 0, SpO₂ scale 1 94–95 → 1, on oxygen → 2, SBP 111–219 → 0, pulse 51–90 → 0, alert → 0, temp 36.1–38.0 → 0.
    const r = news2(news2InputOf(obs), 1);
    expect(r.complete).toBe(true);
    expect(r.total).toBe(3);
  });
});
