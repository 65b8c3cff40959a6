import { describe, expect, it } from 'vitest';
import { ingestBatchSchema, toDeviceReading } from './reading.ts';

const now = new Date('2026-12-02T10:00:00Z');

describe('device feed batch', () => {
  it('accepts good readings and fills the trace', () => {
    const b = ingestBatchSchema(now).parse({
      readings: [
        { at: '2026-12-02T09:59:00Z', spo2: 95, heartRate: 80 },
        { at: '2026-12-02T09:59:01+00:00', trace: 'absent' },
      ],
    });
    expect(b.readings.map(toDeviceReading).map((r) => r.trace)).toEqual(['clean', 'absent']);
  });

  it('names a bad reading by its index and field', () => {
    const r = ingestBatchSchema(now).safeParse({
      readings: [
        { at: '2026-12-02T09:59:00Z', spo2: 95 },
        { at: '2026-12-02T09:59:01Z', spo2: 140 },
        { at: '2026-12-02 09:59', spo2: 95 },
        { at: '2026-12-03T09:59:00Z', spo2: 95 },
      ],
    });
    expect(r.success).toBe(false);
    const paths = r.error!.issues.map((i) => i.path.join('.'));
    expect(paths).toEqual(['readings.1.spo2', 'readings.2.at', 'readings.3.at']);
  });

  it('refuses more than 3,600 readings and an empty batch', () => {
    const many = Array.from({ length: 3601 }, (_, i) => ({
      at: new Date(now.getTime() - i * 1000).toISOString(),
      spo2: 95,
    }));
    expect(ingestBatchSchema(now).safeParse({ readings: many }).error!.issues[0]!.path).toEqual(['readings']);
    expect(ingestBatchSchema(now).safeParse({ readings: [] }).success).toBe(false);
    expect(ingestBatchSchema(now).safeParse({ readings: many.slice(0, 3600) }).success).toBe(true);
  });
});
