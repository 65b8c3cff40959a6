import { describe, expect, it } from 'vitest';
import { stayAt } from './stays.ts';

const T = Date.parse('2026-12-02T10:00:00Z');
const stays = [
  { id: 1, started_at: new Date(T - 7_200_000), ended_at: new Date(T - 3_600_000) },
  { id: 2, started_at: new Date(T - 3_600_000), ended_at: null },
];

describe('stayAt', () => {
  it('finds the stay a moment falls in; a move hands over at the instant the new stay starts', () => {
    expect(stayAt(stays, T - 5_000_000)?.id).toBe(1);
    expect(stayAt(stays, T - 3_600_000)?.id).toBe(2);
    expect(stayAt(stays, T - 3_600_001)?.id).toBe(1);
  });
  it('nothing before admission; an open stay runs until openUntil', () => {
    expect(stayAt(stays, T - 8_000_000)).toBeUndefined();
    expect(stayAt(stays, T + 86_400_000)?.id).toBe(2);
    expect(stayAt(stays, T + 60_000, T)).toBeUndefined();
  });
});
