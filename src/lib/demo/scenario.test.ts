import { describe, expect, it } from 'vitest';
import { demoPatients, demoUnits, generateDemoObservations } from './scenario.ts';

const now = new Date('2026-12-02T12:00:00Z');

describe('demo scenario (invented data)', () => {
  const obs = generateDemoObservations(now);

  it('is the same on every run', () => {
    expect(generateDemoObservations(now)).toEqual(obs);
  });

  it('puts every patient in a bed of their unit, one patient a bed', () => {
    const beds = new Set<string>();
    for (const p of demoPatients) {
      expect(demoUnits.find((u) => u.code === p.unitCode)?.beds).toContain(p.bedLabel);
      expect(beds.has(p.bedLabel)).toBe(false);
      beds.add(p.bedLabel);
    }
  });

  it('contains the stories the brief asks for', () => {
    const stories = new Set(demoPatients.map((p) => p.story));
    for (const s of ['desaturating', 'motion', 'above_on_oxygen', 'overdue']) expect(stories).toContain(s);
    const motion = demoPatients.find((p) => p.story === 'motion')!;
    expect(obs.some((o) => o.mrn === motion.mrn && o.trace === 'noisy')).toBe(true);
    const desat = demoPatients.find((p) => p.story === 'desaturating')!;
    const recent = obs.filter(
      (o) => o.mrn === desat.mrn && o.source === 'charted' && now.getTime() - o.takenAt.getTime() < 20 * 60_000,
    );
    expect(recent.length).toBeGreaterThanOrEqual(2);
    expect(recent.every((o) => o.spo2 < desat.band!.low)).toBe(true);
    const overdue = demoPatients.find((p) => p.story === 'overdue')!;
    const lastCharted = Math.max(
      ...obs.filter((o) => o.mrn === overdue.mrn && o.source === 'charted').map((o) => o.takenAt.getTime()),
    );
    expect((now.getTime() - lastCharted) / 60_000).toBeGreaterThan(75);
  });

  it('spans 48 h and never reaches into the future', () => {
    const times = obs.map((o) => o.takenAt.getTime());
    expect((now.getTime() - Math.min(...times)) / 3_600_000).toBeCloseTo(48, 0);
    expect(Math.max(...times)).toBeLessThanOrEqual(now.getTime());
  });
});

describe('demo blood gases (invented)', async () => {
  const { demoBloodGases, demoPatients: patients } = await import('./scenario.ts');
  const { gasFlags } = await import('~/lib/bloodgas/compute.ts');
  it('belong to demo patients and include one pair where the oximeter over-reads', () => {
    for (const g of demoBloodGases) expect(patients.some((p) => p.mrn === g.mrn)).toBe(true);
    expect(demoBloodGases.filter((g) => gasFlags(g).includes('occult_hypoxaemia'))).toHaveLength(1);
  });
});
