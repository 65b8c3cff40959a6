// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import BedChartPage from './BedChartPage.tsx';
import { chartKeys } from './chart-shared.tsx';
import { Fresh, T0, iso, obs, patient, series, stubFetch } from './fixtures.tsx';
import type { PatientDetail } from '~/lib/charting/api-types.ts';

afterEach(() => {
  cleanup();
  vi.useRealTimers();
  vi.unstubAllGlobals();
});

function setup(p: PatientDetail, opts: { initial?: boolean } = {}) {
  const stub = stubFetch({
    'GET /api/patients/3': () => ({ body: p }),
    'GET /api/patients/3/series?hours=12': () => ({ body: series() }),
    'GET /api/patients/3/series?hours=24': () => ({ body: series({ hours: 24, from: T0 - 24 * 3_600_000 }) }),
    'GET /api/patients/3/observations': () => ({ body: { items: [obs()], page: 1, pageSize: 20, total: 1 } }),
    'GET /api/patients/3/targets': () => ({ body: { orders: p.orders } }),
    'POST /api/patients/3/observations': (c) => ({
      status: 201,
      body: { observation: obs({ id: 200, takenAt: String((c.body as { takenAt: string }).takenAt) }) },
    }),
  });
  vi.stubGlobal('fetch', vi.fn(stub.fn));
  render(
    <Fresh>
      <BedChartPage
        patientId={3}
        initial={opts.initial === false ? undefined : { patient: p }}
        chartSize={{ width: 800, height: 320 }}
      />
    </Fresh>,
  );
  return stub;
}

describe('chartKeys', () => {
  it('matches every key of the patient and no other patient', () => {
    const k = chartKeys(1);
    expect(k.matches('/api/patients/1')).toBe(true);
    expect(k.matches(k.series(72))).toBe(true);
    expect(k.matches(k.observations(2))).toBe(true);
    expect(k.matches(k.targets)).toBe(true);
    expect(k.matches('/api/patients/12')).toBe(false);
    expect(k.matches('/api/patients/12/series?hours=12')).toBe(false);
    expect(k.matches(['/api/patients/1'])).toBe(false);
  });
});

// Three chart panels and four islands' worth of UI in jsdom: slow on a shared machine.
vi.setConfig({ testTimeout: 20_000 });

describe('BedChartPage', () => {
  it('lays out the chart, figures, entry form, obs record and orders for a nurse', async () => {
    setup(patient({ can: { chart: true, order: false, admit: false } }));
    expect(screen.getByRole('heading', { level: 2, name: 'Bed 4 · AQ·123' }).textContent).toBe('Bed 4 · AQ·123');
    expect(screen.getByRole('group', { name: 'Chart window' })).toBeTruthy();
    await waitFor(() =>
      expect(screen.getByTestId('chart-summary').textContent).toContain('latest 90 % at 11:50, below band 92–96 %'),
    );
    expect(screen.getByTestId('derived-figures')).toBeTruthy();
    expect(screen.getByTestId('obs-entry-form')).toBeTruthy();
    await waitFor(() => expect(document.getElementById('obs-101')).not.toBeNull());
    expect(screen.getByTestId('target-panel')).toBeTruthy();
    expect(screen.queryByTestId('order-form')).toBeNull();
    // Printed: a header and every charted obs of the window (hidden on screen).
    expect(screen.getByTestId('print-header').textContent).toMatch(/Printed \d+ \w{3} \d\d:\d\d/);
    await waitFor(() => expect(screen.getByTestId('print-record').querySelectorAll('tbody tr')).toHaveLength(1));
    // Device and FiO₂ come from the last charted obs.
    expect((screen.getByLabelText('Oxygen device') as HTMLSelectElement).value).toBe('simple_mask');
  });

  it('shows the order form but no entry form to an intensivist who may not chart', async () => {
    setup(patient({ can: { chart: false, order: true, admit: false } }));
    expect(screen.getByTestId('order-form')).toBeTruthy();
    expect(screen.queryByTestId('obs-entry-form')).toBeNull();
    await waitFor(() => expect(document.getElementById('obs-101')).not.toBeNull());
    expect(screen.queryByRole('button', { name: /^Correct/ })).toBeNull();
  });

  it('loads the patient itself when the page gave none', async () => {
    const stub = setup(patient(), { initial: false });
    expect(screen.getByText('Loading the bed chart…')).toBeTruthy();
    await waitFor(() =>
      expect(screen.getByRole('heading', { level: 2, name: 'Bed 4 · AQ·123' }).textContent).toBe('Bed 4 · AQ·123'),
    );
    expect(stub.calls.some((c) => c.url === '/api/patients/3')).toBe(true);
  });

  it('fetches the chosen window', async () => {
    const stub = setup(patient());
    await waitFor(() => expect(screen.getByTestId('chart-summary')).toBeTruthy());
    fireEvent.click(screen.getByRole('button', { name: '24 h' }));
    await waitFor(() => expect(screen.getByTestId('chart-summary').textContent).toMatch(/^SpO₂ over the last 24 h/));
    expect(stub.calls.some((c) => c.url === '/api/patients/3/series?hours=24')).toBe(true);
    expect(screen.getByRole('button', { name: '24 h' }).getAttribute('aria-pressed')).toBe('true');
  });

  it('refreshes the chart, the record and the patient after an obs is saved', async () => {
    vi.useFakeTimers({ toFake: ['Date'] });
    vi.setSystemTime(T0);
    const stub = setup(patient());
    await waitFor(() => expect(screen.getByTestId('chart-summary')).toBeTruthy());
    await waitFor(() => expect(document.getElementById('obs-101')).not.toBeNull());
    const count = (url: string) => stub.calls.filter((c) => c.method === 'GET' && c.url.startsWith(url)).length;
    const before = {
      series: count('/api/patients/3/series'),
      obs: count('/api/patients/3/observations'),
      patient: stub.calls.filter((c) => c.url === '/api/patients/3').length,
    };
    fireEvent.change(screen.getByLabelText('SpO₂ (%)'), { target: { value: '95' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save obs' }));
    await waitFor(() =>
      expect(screen.getAllByRole('status').some((s) => s.textContent?.startsWith('Saved'))).toBe(true),
    );
    expect(stub.calls.find((c) => c.method === 'POST')!.body).toMatchObject({ spo2: 95, fio2: 0.4, takenAt: iso(T0) });
    await waitFor(() => {
      expect(count('/api/patients/3/series')).toBeGreaterThan(before.series);
      expect(count('/api/patients/3/observations')).toBeGreaterThan(before.obs);
      expect(stub.calls.filter((c) => c.url === '/api/patients/3').length).toBeGreaterThan(before.patient);
    });
  });
});
