import { describe, expect, it } from 'vitest';
import { buildEscalationMail, MAIL_CAUTION, readingLines } from './mail.ts';

const base = {
  hospital: 'Harbourside General',
  unitName: 'Level 4 ICU',
  bedLabel: '4-01',
  patientLabel: 'MQ ·117',
  timeZone: 'Europe/London',
  kind: 'below_band' as const,
  severity: 'urgent' as const,
  renotify: 0,
  band: { low: 92, high: 96 },
  run: { start: Date.UTC(2026, 11, 2, 10, 0), end: Date.UTC(2026, 11, 2, 10, 18), nadir: 86, rule: 'device_dwell' },
  lastReadings: [
    { at: Date.UTC(2026, 11, 2, 10, 18), spo2: 86, trace: 'clean' as const, heartRate: 112, source: 'device' },
  ],
  oxygen: { fio2: 0.5, fio2Estimated: false, device: 'high_flow_nasal' as const },
  news2: { total: 7, scale: 1 as const },
  link: 'http://127.0.0.1:4321/patients/1',
};

describe('escalation e-mail', () => {
  it('puts unit, bed, kind and severity in the subject', () => {
    expect(buildEscalationMail(base).subject).toBe('[Ebbwatch] URGENT Below band — Level 4 ICU bed 4-01');
    expect(buildEscalationMail({ ...base, renotify: 2, severity: 'standard' }).subject).toBe(
      '[Ebbwatch] Below band — Level 4 ICU bed 4-01 (reminder 2, not yet claimed)',
    );
  });

  it('carries the band, the run, the readings with trace, oxygen, NEWS2, the link and the caution — and only the patient label', () => {
    const { text, html } = buildEscalationMail(base);
    for (const part of [
      'MQ ·117',
      'Ordered band: 92–96 %',
      'since 10:00',
      'lowest trusted SpO₂ 86 %',
      'High-flow nasal, FiO₂ 0.50',
      'NEWS2: 7 (Scale 1)',
      'trace clean',
      base.link,
      MAIL_CAUTION,
    ]) {
      expect(text).toContain(part);
    }
    expect(html).toContain('href="http://127.0.0.1:4321/patients/1"');
    expect(html).toContain('MQ ·117');
  });

  it('escapes HTML in what it is given', () => {
    expect(buildEscalationMail({ ...base, unitName: '<b>x</b>' }).html).not.toContain('<b>x</b>');
  });
});

describe('escalation e-mail that reads well on a phone (issue 10 point 7)', () => {
  const t = (h: number, m: number, sec = 0) => Date.UTC(2026, 11, 2, h, m, sec); // London = UTC in December
  const reading = (at: number, spo2: number, trace: 'clean' | 'noisy' = 'clean') => ({
    at,
    spo2,
    trace,
    heartRate: 110,
    source: 'device',
  });

  it('HTML has a viewport meta and one column; the plain-text part says the same', () => {
    const { html, text } = buildEscalationMail(base);
    expect(html).toContain('<meta name="viewport" content="width=device-width, initial-scale=1">');
    expect(html).toMatch(/max-width:560px/);
    expect(html).not.toMatch(/<table|float:|display:flex|display:grid|<td/); // nothing side by side
    expect(text).toContain('Ordered band: 92–96 %');
    expect(text).not.toContain('<');
  });

  it('readings a while apart are listed with seconds', () => {
    const rows = readingLines(
      [reading(t(10, 18, 5), 87), reading(t(10, 18, 35), 86), reading(t(10, 19, 10), 88)],
      'Europe/London',
    );
    expect(rows.map((r) => `${r.time} ${r.spo2}`)).toEqual(['10:18:05 87 %', '10:18:35 86 %', '10:19:10 88 %']);
  });

  it('readings seconds apart are collapsed per minute with the lowest and highest SpO₂', () => {
    const rs = Array.from({ length: 36 }, (_, i) =>
      reading(t(10, 15) + i * 5_000, 86 + (i % 3), i === 30 ? 'noisy' : 'clean'),
    ); // 10:15:00–10:17:55
    const rows = readingLines(rs, 'Europe/London');
    expect(rows.map((r) => `${r.time} ${r.spo2}`)).toEqual(['10:15 86–88 %', '10:16 86–88 %', '10:17 86–88 %']);
    expect(rows[2]!.detail).toBe('12 readings in the minute, 1 with a poor trace · device');
    const { text } = buildEscalationMail({ ...base, lastReadings: rs });
    expect(text).toContain('  10:16  SpO₂ 86–88 %  12 readings in the minute · device');
    for (const minute of ['10:15', '10:16', '10:17'])
      expect(text.match(new RegExp(`^  ${minute}`, 'gm'))).toHaveLength(1); // one row a minute
  });

  it('a reminder with nothing newer than the previous notice says so; so does a silent monitor', () => {
    const rs = [reading(t(6, 8, 0), 87), reading(t(6, 8, 20), 87)];
    const reminder = buildEscalationMail({
      ...base,
      renotify: 1,
      lastReadings: rs,
      now: t(6, 10),
      previousNoticeAt: t(6, 9),
      monitorSilentMin: 3,
    });
    expect(reminder.text).toContain('No new readings since 06:08.');
    expect(reminder.html).toContain('No new readings since 06:08.');
    const silent = buildEscalationMail({ ...base, lastReadings: rs, now: t(6, 23), monitorSilentMin: 3 });
    expect(silent.text).toContain('No new readings since 06:08.');
    const fresh = buildEscalationMail({
      ...base,
      renotify: 1,
      lastReadings: [...rs, reading(t(6, 9, 30), 86)],
      now: t(6, 10),
      previousNoticeAt: t(6, 9),
      monitorSilentMin: 3,
    });
    expect(fresh.text).not.toContain('No new readings');
  });

  it('NEWS2 names the parameters it lacks', () => {
    const { text } = buildEscalationMail({ ...base, news2: { missing: ['respRate', 'temperature'] } });
    expect(text).toContain('NEWS2: incomplete — missing respiratory rate, temperature');
  });

  it('names the bedside nurse and the unit phone, and carries the one-click claim link', () => {
    const claimLink = 'http://127.0.0.1:4321/escalations/claim?token=abc.def';
    const m = buildEscalationMail({
      ...base,
      bedsideNurse: 'Nia Fixture',
      unitPhone: '+44 20 7946 0000',
      claimLink,
      claimLinkExpiresAt: t(12, 0),
      now: t(10, 20),
    });
    expect(m.text).toContain('Bedside nurse: Nia Fixture · Unit phone: +44 20 7946 0000');
    expect(m.text).toContain(`Claim it: ${claimLink} (works once, until 12:00, after sign-in)`);
    expect(m.html).toContain(`href="${claimLink}"`);
    expect(buildEscalationMail(base).text).toContain('Bedside nurse: none assigned · Unit phone: not set');
  });
});
