/**
 * Invented fixtures and fetch stubs for the bed chart component tests (no real people or data).
 * Imported only by *.test.tsx files.
 */
import type { ReactNode } from 'react';
import { SWRConfig } from 'swr';
import type { ObsView, OrderView, PatientDetail, SeriesResponse } from '~/lib/charting/api-types.ts';

export const T0 = Date.parse('2025-03-12T12:00:00Z');
export const iso = (ms: number) => new Date(ms).toISOString();

export function order(over: Partial<OrderView> = {}): OrderView {
  return {
    id: 7,
    low: 92,
    high: 96,
    news2Scale: 1,
    preset: 'tsanz_most',
    reason: 'Pneumonia, improving',
    scaleReason: null,
    orderedAt: iso(T0 - 10 * 3_600_000),
    orderedBy: 'Dr Imogen Vale',
    supersedesId: 6,
    scale2Basis: null,
    ...over,
  };
}

export function obs(over: Partial<ObsView> = {}): ObsView {
  return {
    id: 101,
    takenAt: iso(T0 - 30 * 60_000),
    source: 'charted',
    spo2: 94,
    heartRate: 88,
    respRate: 18,
    fio2: 0.4,
    fio2Estimated: false,
    device: 'simple_mask',
    flowLpm: 6,
    trace: 'clean',
    perfusionIndex: 2.1,
    probeSite: 'left index finger',
    systolic: 118,
    temperature: 37.2,
    consciousness: 'alert',
    note: null,
    status: 'current',
    replacesId: null,
    replacedById: null,
    statusReason: null,
    statusBy: null,
    statusAt: null,
    recordedBy: 'Nurse Rowan Pike',
    recordedAt: iso(T0 - 29 * 60_000),
    notices: [],
    ...over,
  };
}

export function patient(over: Partial<PatientDetail> = {}): PatientDetail {
  const orders = over.orders ?? [
    order(),
    order({
      id: 6,
      low: 94,
      high: 98,
      preset: 'bts_most',
      reason: 'Admission',
      orderedAt: iso(T0 - 30 * 3_600_000),
      supersedesId: null,
    }),
  ];
  return {
    id: 3,
    mrn: 'HG000123',
    givenName: 'Ada',
    familyName: 'Quill',
    label: 'AQ·123',
    dateOfBirth: '1950-02-01',
    co2RetentionRisk: false,
    bed: { id: 4, label: 'Bed 4', unitCode: 'L4', unitName: 'Level 4 ICU' },
    admittedAt: iso(T0 - 30 * 3_600_000),
    band: orders[0] ?? null,
    timeZone: 'Europe/London',
    stays: [],
    orders,
    lastCharted: obs(),
    can: { chart: true, order: false, admit: false },
    ...over,
  };
}

export function series(over: Partial<SeriesResponse> = {}): SeriesResponse {
  const from = T0 - 12 * 3_600_000;
  const to = T0;
  return {
    patientId: 3,
    hours: 12,
    from,
    to,
    generatedAt: iso(T0),
    bloodGases: [],
    newestReading: null,
    spo2: [
      { t: from + 3_600_000, v: 95, trusted: true, source: 'charted' },
      { t: from + 2 * 3_600_000, v: 83, trusted: false, source: 'device' },
      { t: from + 3 * 3_600_000, v: 89, trusted: true, source: 'device' },
      { t: to - 600_000, v: 90, trusted: true, source: 'charted' },
    ],
    heartRate: [
      { t: from + 3_600_000, v: 88 },
      { t: to - 600_000, v: 104 },
    ],
    fio2: [
      { t: from, v: 0.35, device: 'simple_mask', flowLpm: 6, estimated: false },
      { t: from + 4 * 3_600_000, v: 0.5, device: 'high_flow_nasal', flowLpm: 40, estimated: false },
    ],
    bucketMs: 0,
    bands: [
      { from, to: from + 2 * 3_600_000, low: 94, high: 98 },
      { from: from + 2 * 3_600_000, to, low: 92, high: 96 },
    ],
    escalations: [
      {
        id: 1,
        raisedAt: from + 5 * 3_600_000,
        closedAt: from + 6 * 3_600_000,
        kind: 'sustained_below',
        severity: 'urgent',
      },
    ],
    rawCounts: { spo2: 4312, heartRate: 4300 },
    derived: {
      window: { from: iso(from), to: iso(to), hours: 12 },
      compliance: {
        inBandMin: 540,
        belowMin: 95,
        aboveMin: 15,
        untrustedMin: 30,
        noReadingMin: 40,
        noBandMin: 0,
        windowMin: 720,
        burdenPctMin: 310,
        inBandPct: 75,
        trustedReadings: 4000,
        untrustedReadings: 312,
      },
      latest: {
        takenAt: iso(to - 600_000),
        spo2: 90,
        fio2: 0.5,
        fio2Estimated: true,
        device: 'simple_mask',
        sf: 180,
        rox: null,
        roxNote: null,
        imputedPf: { pao2: 58, pf: 116 },
        imputedPfNote: null,
        news2: {
          total: null,
          complete: false,
          missing: ['temperature', 'consciousness'],
          response: null,
          scale: 1,
          takenAt: iso(to - 600_000),
        },
      },
    },
    ...over,
  };
}

export interface StubCall {
  url: string;
  method: string;
  body: unknown;
}

/** A fetch stub: `routes` maps "METHOD path" (path without query, or with it) to a response. */
export function stubFetch(routes: Record<string, (call: StubCall) => { status?: number; body: unknown }>) {
  const calls: StubCall[] = [];
  const fn = async (input: RequestInfo | URL, init?: RequestInit) => {
    const url = String(input);
    const method = (init?.method ?? 'GET').toUpperCase();
    const body = init?.body ? JSON.parse(String(init.body)) : undefined;
    const call = { url, method, body };
    calls.push(call);
    const route = routes[`${method} ${url}`] ?? routes[`${method} ${url.split('?')[0]}`];
    if (!route)
      return new Response(JSON.stringify({ error: { code: 'not_found', message: `No stub for ${method} ${url}` } }), {
        status: 404,
        headers: { 'content-type': 'application/json' },
      });
    const r = route(call);
    return new Response(JSON.stringify(r.body), {
      status: r.status ?? 200,
      headers: { 'content-type': 'application/json' },
    });
  };
  return { fn, calls };
}

/** A fresh SWR cache per test, no deduping, no polling. */
export function Fresh({ children }: { children: ReactNode }) {
  return (
    <SWRConfig value={{ provider: () => new Map(), dedupingInterval: 0, refreshInterval: 0 }}>{children}</SWRConfig>
  );
}
