import { describe, expect, it } from 'vitest';
import { isRealIsoDate, isRealIsoDateTime } from './iso.ts';

describe('ISO 8601 times the API takes', () => {
  it('accepts real times with a zone', () => {
    for (const ok of [
      '2026-12-02T10:15:00Z',
      '2026-12-02T10:15Z',
      '2026-12-02T10:15:00.123+01:00',
      '2024-02-29T00:00:00Z',
      '2026-12-31T23:59:59-05:00',
    ]) {
      expect(isRealIsoDateTime(ok), ok).toBe(true);
    }
  });
  it('refuses impossible calendar dates that Date.parse rolls over, and times without a zone', () => {
    for (const bad of [
      '2026-11-31T12:00:00Z',
      '2026-02-29T00:00:00Z',
      '2026-13-01T00:00:00Z',
      '2026-12-02T24:00:00Z',
      '2026-12-02T10:60:00Z',
      '2026-12-02T10:15:00',
      '2026-12-02 10:15:00Z',
      '1764670500000',
      '',
    ]) {
      expect(isRealIsoDateTime(bad), bad).toBe(false);
    }
    expect(Date.parse('2026-11-31T12:00:00Z')).not.toBeNaN(); // why the check exists
  });
  it('dates alone', () => {
    expect(isRealIsoDate('2024-02-29')).toBe(true);
    expect(isRealIsoDate('2023-02-29')).toBe(false);
    expect(isRealIsoDate('2023-04-31')).toBe(false);
  });
});
