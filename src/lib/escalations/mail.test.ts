import { describe, expect, it } from 'vitest';
import { buildEscalationMail, MAIL_CAUTION } from './mail.ts';

const base = {
  hospital: 'Harbourside General', unitName: 'Level 4 ICU', bedLabel: '4-01', patientLabel: 'MQ ·117', timeZone: 'Europe/London',
  kind: 'below_band' as const, severity: 'urgent' as const, renotify: 0, band: { low: 92, high: 96 },
  run: { start: Date.UTC(2026, 11, 2, 10, 0), end: Date.UTC(2026, 11, 2, 10, 18), nadir: 86, rule: 'device_dwell' },
  lastReadings: [{ at: Date.UTC(2026, 11, 2, 10, 18), spo2: 86, trace: 'clean' as const, heartRate: 112, source: 'device' }],
  oxygen: { fio2: 0.5, fio2Estimated: false, device: 'high_flow_nasal' as const }, news2: { total: 7, scale: 1 as const },
  link: 'http://127.0.0.1:4321/patients/1',
};

describe('escalation e-mail', () => {
  it('puts unit, bed, kind and severity in the subject', () => {
    expect(buildEscalationMail(base).subject).toBe('[Ebbwatch] URGENT Below band — Level 4 ICU bed 4-01');
    expect(buildEscalationMail({ ...base, renotify: 2, severity: 'standard' }).subject).toBe('[Ebbwatch] Below band — Level 4 ICU bed 4-01 (reminder 2, not yet claimed)');
  });

  it('carries the band, the run, the readings with trace, oxygen, NEWS2, the link and the caution — and only the patient label', () => {
    const { text, html } = buildEscalationMail(base);
    for (const part of ['MQ ·117', 'Ordered band: 92–96 %', 'since 10:00', 'lowest trusted SpO₂ 86 %', 'High-flow nasal, FiO₂ 0.50', 'NEWS2: 7 (Scale 1)', 'trace clean', base.link, MAIL_CAUTION]) {
      expect(text).toContain(part);
    }
    expect(html).toContain('href="http://127.0.0.1:4321/patients/1"');
    expect(html).toContain('MQ ·117');
  });

  it('escapes HTML in what it is given', () => {
    expect(buildEscalationMail({ ...base, unitName: '<b>x</b>' }).html).not.toContain('<b>x</b>');
  });
});
