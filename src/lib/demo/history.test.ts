import { describe, expect, it } from 'vitest';
import { demoPatients } from './scenario.ts';
import { generateDemoHistory, HISTORY_DAYS } from './history.ts';

const now = new Date('2026-12-02T12:00:00Z');

describe('demo history (invented)', () => {
  const h = generateDemoHistory(now);
  it('is the same on every run', () => {
    expect(generateDemoHistory(now)).toEqual(h);
  });
  it('covers at least 14 days in every unit and ends before today’s patients in each bed', () => {
    const first = Math.min(...h.patients.map((p) => p.admittedAt.getTime()));
    expect((now.getTime() - first) / 86_400_000).toBeGreaterThanOrEqual(HISTORY_DAYS);
    for (const p of h.patients) {
      const current = demoPatients.find((c) => c.bedLabel === p.bedLabel);
      const admitted = now.getTime() - (current ? current.admittedHoursAgo : 48) * 3_600_000;
      expect(p.dischargedAt.getTime()).toBeLessThan(admitted);
      expect(p.dischargedAt.getTime()).toBeGreaterThan(p.admittedAt.getTime());
    }
    expect(new Set(h.patients.map((p) => p.unitCode))).toEqual(new Set(['L4ICU', 'L5HDU']));
  });
  it('never overlaps two stays in one bed, and keeps obs inside each stay', () => {
    const byBed = new Map<string, { a: number; d: number }[]>();
    for (const p of h.patients)
      byBed.set(p.bedLabel, [
        ...(byBed.get(p.bedLabel) ?? []),
        { a: p.admittedAt.getTime(), d: p.dischargedAt.getTime() },
      ]);
    for (const stays of byBed.values())
      for (let i = 1; i < stays.length; i++) expect(stays[i]!.a).toBeGreaterThan(stays[i - 1]!.d);
    const stay = new Map(h.patients.map((p) => [p.mrn, p]));
    for (const o of h.observations) {
      const p = stay.get(o.mrn)!;
      expect(o.takenAt.getTime()).toBeGreaterThanOrEqual(p.admittedAt.getTime());
      expect(o.takenAt.getTime()).toBeLessThan(p.dischargedAt.getTime());
    }
  });
  it('has below-band spells with escalations claimed and closed, and uses MRNs apart from today’s patients', () => {
    expect(h.escalations.filter((e) => e.kind === 'below_band').length).toBeGreaterThan(5);
    for (const e of h.escalations) expect(e.closedAt.getTime()).toBeGreaterThan(e.claimedAt.getTime());
    expect(h.patients.every((p) => !p.mrn.startsWith('HG'))).toBe(true);
  });
});
