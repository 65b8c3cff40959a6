import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { ComputationInputError } from './errors';
import { news2, roundHalfUp, type News2Observations } from './news2';

// Every expected score below is read off the Royal College of Physicians chart,
// National Early Warning Score (NEWS) 2, 2017 — both sides of every step of every parameter.

const allNormal: Required<News2Observations> = {
  respRate: 16,
  spo2: 97,
  onOxygen: false,
  systolic: 120,
  pulse: 70,
  consciousness: 'alert',
  temperature: 37.0,
};

function part(obs: News2Observations, key: keyof ReturnType<typeof news2>['parts'], scale: 1 | 2 = 1) {
  return news2({ ...allNormal, ...obs }, scale).parts[key];
}

describe('NEWS2 step boundaries (RCP NEWS2 2017)', () => {
  it.each([
    [8, 3],
    [9, 1],
    [11, 1],
    [12, 0],
    [20, 0],
    [21, 2],
    [24, 2],
    [25, 3],
  ])('respiratory rate %d /min scores %d', (respRate, score) => {
    expect(part({ respRate }, 'respRate')).toBe(score);
  });

  it.each([
    [91, 3],
    [92, 2],
    [93, 2],
    [94, 1],
    [95, 1],
    [96, 0],
    [100, 0],
  ])('SpO₂ Scale 1 %d %% scores %d (on air and on oxygen alike)', (spo2, score) => {
    expect(part({ spo2, onOxygen: false }, 'spo2', 1)).toBe(score);
    expect(part({ spo2, onOxygen: true }, 'spo2', 1)).toBe(score);
  });

  it.each([
    [83, 3],
    [84, 2],
    [85, 2],
    [86, 1],
    [87, 1],
    [88, 0],
    [92, 0],
    [93, 0],
    [97, 0],
    [100, 0],
  ])('SpO₂ Scale 2 on air %d %% scores %d', (spo2, score) => {
    expect(part({ spo2, onOxygen: false }, 'spo2', 2)).toBe(score);
  });

  it.each([
    [83, 3],
    [84, 2],
    [85, 2],
    [86, 1],
    [87, 1],
    [88, 0],
    [92, 0],
    [93, 1],
    [94, 1],
    [95, 2],
    [96, 2],
    [97, 3],
    [100, 3],
  ])('SpO₂ Scale 2 on oxygen %d %% scores %d', (spo2, score) => {
    expect(part({ spo2, onOxygen: true }, 'spo2', 2)).toBe(score);
  });

  it('air scores 0 and oxygen scores 2', () => {
    expect(part({ onOxygen: false }, 'airOrOxygen')).toBe(0);
    expect(part({ onOxygen: true }, 'airOrOxygen')).toBe(2);
  });

  it.each([
    [90, 3],
    [91, 2],
    [100, 2],
    [101, 1],
    [110, 1],
    [111, 0],
    [219, 0],
    [220, 3],
  ])('systolic %d mmHg scores %d', (systolic, score) => {
    expect(part({ systolic }, 'systolic')).toBe(score);
  });

  it.each([
    [40, 3],
    [41, 1],
    [50, 1],
    [51, 0],
    [90, 0],
    [91, 1],
    [110, 1],
    [111, 2],
    [130, 2],
    [131, 3],
  ])('pulse %d /min scores %d', (pulse, score) => {
    expect(part({ pulse }, 'pulse')).toBe(score);
  });

  it.each([
    ['alert', 0],
    ['new_confusion', 3],
    ['voice', 3],
    ['pain', 3],
    ['unresponsive', 3],
  ] as const)('consciousness %s scores %d', (consciousness, score) => {
    expect(part({ consciousness }, 'consciousness')).toBe(score);
  });

  it.each([
    [35.0, 3],
    [35.1, 1],
    [36.0, 1],
    [36.1, 0],
    [38.0, 0],
    [38.1, 1],
    [39.0, 1],
    [39.1, 2],
  ])('temperature %s °C scores %s', (temperature, score) => {
    expect(part({ temperature }, 'temperature')).toBe(score);
  });
});

describe('NEWS2 rounding between steps (our documented rule: half-up to whole numbers, temperature to 0.1)', () => {
  it('rounds respiratory rate, SpO₂, systolic and pulse to whole numbers before scoring', () => {
    expect(part({ respRate: 20.4 }, 'respRate')).toBe(0);
    expect(part({ respRate: 20.5 }, 'respRate')).toBe(2);
    expect(part({ spo2: 95.4 }, 'spo2')).toBe(1);
    expect(part({ spo2: 95.5 }, 'spo2')).toBe(0);
    expect(part({ systolic: 90.5 }, 'systolic')).toBe(2);
    expect(part({ pulse: 130.5 }, 'pulse')).toBe(3);
  });

  it('rounds temperature to one decimal as written (38.05 → 38.1)', () => {
    expect(roundHalfUp(38.05, 1)).toBe(38.1);
    expect(part({ temperature: 35.04 }, 'temperature')).toBe(3);
    expect(part({ temperature: 35.05 }, 'temperature')).toBe(1);
    expect(part({ temperature: 38.05 }, 'temperature')).toBe(1);
    expect(part({ temperature: 38.04 }, 'temperature')).toBe(0);
  });
});

describe('NEWS2 aggregate and response bands (RCP 2017; band words from memory of the RCP chart)', () => {
  it('scores a set of normal observations 0, low', () => {
    const r = news2(allNormal, 1);
    expect(r.total).toBe(0);
    expect(r.complete).toBe(true);
    expect(r.missing).toEqual([]);
    expect(r.response).toBe('low');
    expect(r.anyThree).toBe(false);
  });

  it('sums the parts: oxygen (2) + RR 22 (2) = 4, low', () => {
    const r = news2({ ...allNormal, onOxygen: true, respRate: 22 }, 1);
    expect(r.total).toBe(4);
    expect(r.response).toBe('low');
  });

  it('a single parameter scoring 3 with aggregate under 5 is low–medium', () => {
    const r = news2({ ...allNormal, consciousness: 'voice' }, 1);
    expect(r.total).toBe(3);
    expect(r.anyThree).toBe(true);
    expect(r.response).toBe('low_medium');
  });

  it('5–6 is medium and ≥ 7 high', () => {
    // oxygen 2 + RR 25 → 3 = 5
    expect(news2({ ...allNormal, onOxygen: true, respRate: 25 }, 1).response).toBe('medium');
    // + pulse 111 → 2 = 7
    const high = news2({ ...allNormal, onOxygen: true, respRate: 25, pulse: 111 }, 1);
    expect(high.total).toBe(7);
    expect(high.response).toBe('high');
  });

  it('Scale 2 on oxygen at 97 % adds 3 for SpO₂ and 2 for oxygen', () => {
    const r = news2({ ...allNormal, spo2: 97, onOxygen: true }, 2);
    expect(r.parts.spo2).toBe(3);
    expect(r.total).toBe(5);
    expect(r.scale).toBe(2);
  });
});

describe('NEWS2 missing parameters', () => {
  it('lists missing parameters and gives no total or response', () => {
    const r = news2({ respRate: 18, spo2: 97, pulse: 80 }, 1);
    expect(r.complete).toBe(false);
    expect(r.total).toBeNull();
    expect(r.response).toBeNull();
    expect(r.missing).toEqual(['airOrOxygen', 'systolic', 'consciousness', 'temperature']);
    expect(r.parts.respRate).toBe(0);
  });

  it('still reports a 3 among the parameters present', () => {
    expect(news2({ respRate: 30 }, 1).anyThree).toBe(true);
  });

  it('Scale 2 cannot score SpO₂ ≥ 93 % without the air/oxygen status', () => {
    const r = news2({ ...allNormal, onOxygen: null, spo2: 95 }, 2);
    expect(r.parts.spo2).toBeNull();
    expect(r.missing).toContain('spo2');
    expect(r.missing).toContain('airOrOxygen');
    expect(news2({ ...allNormal, onOxygen: null, spo2: 85 }, 2).parts.spo2).toBe(2);
  });
});

describe('NEWS2 bad input', () => {
  it.each([
    [{ respRate: Number.NaN }, 'respRate'],
    [{ spo2: 101 }, 'spo2'],
    [{ spo2: -1 }, 'spo2'],
    [{ systolic: -5 }, 'systolic'],
    [{ pulse: Number.POSITIVE_INFINITY }, 'pulse'],
    [{ temperature: 3700 }, 'temperature'],
  ] as const)('%o throws ComputationInputError on %s', (obs, field) => {
    expect(() => news2(obs as News2Observations, 1)).toThrowError(ComputationInputError);
    try {
      news2(obs as News2Observations, 1);
    } catch (e) {
      expect((e as ComputationInputError).field).toBe(field);
    }
  });

  it('refuses an unknown consciousness level and an unknown scale', () => {
    expect(() => news2({ consciousness: 'drowsy' as never }, 1)).toThrowError(ComputationInputError);
    expect(() => news2({}, 3 as never)).toThrowError(ComputationInputError);
  });
});

describe('NEWS2 properties', () => {
  const spo2Pair = fc.tuple(fc.double({ min: 0, max: 100, noNaN: true }), fc.double({ min: 0, max: 100, noNaN: true }));

  it('lowering SpO₂ never lowers the SpO₂ score on Scale 1 (air or oxygen) or Scale 2 on air', () => {
    fc.assert(
      fc.property(spo2Pair, fc.boolean(), ([a, b], onOxygen) => {
        const [lower, higher] = a <= b ? [a, b] : [b, a];
        expect(news2({ spo2: lower, onOxygen }, 1).parts.spo2!).toBeGreaterThanOrEqual(
          news2({ spo2: higher, onOxygen }, 1).parts.spo2!,
        );
        expect(news2({ spo2: lower, onOxygen: false }, 2).parts.spo2!).toBeGreaterThanOrEqual(
          news2({ spo2: higher, onOxygen: false }, 2).parts.spo2!,
        );
      }),
    );
  });

  it('on Scale 2 with oxygen, lowering SpO₂ never lowers the score at 92 % and below', () => {
    // By design of the RCP chart, Scale 2 on oxygen scores saturations above the 88–92 % target
    // too (93–≥97 %), so the property holds on the hypoxaemic side only.
    fc.assert(
      fc.property(
        fc.tuple(fc.double({ min: 0, max: 92, noNaN: true }), fc.double({ min: 0, max: 92, noNaN: true })),
        ([a, b]) => {
          const [lower, higher] = a <= b ? [a, b] : [b, a];
          expect(news2({ spo2: lower, onOxygen: true }, 2).parts.spo2!).toBeGreaterThanOrEqual(
            news2({ spo2: higher, onOxygen: true }, 2).parts.spo2!,
          );
        },
      ),
    );
  });
});

describe('roundHalfUp', () => {
  it('rounds tiny and exponent-notation values without producing NaN', () => {
    expect(roundHalfUp(5e-324, 0)).toBe(0);
    expect(roundHalfUp(1e-7, 1)).toBe(0);
    expect(roundHalfUp(36.15, 1)).toBe(36.2);
    expect(roundHalfUp(-2.5, 0)).toBe(-3);
  });
});
