// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen, waitFor, within } from '@testing-library/react';
import ObsRecordTable from './ObsRecordTable.tsx';
import { Fresh, T0, iso, obs, order, stubFetch, type StubCall } from './fixtures.tsx';
import type { ObsPage } from '~/lib/charting/api-types.ts';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const rows = [
  obs({
    id: 130,
    takenAt: iso(T0 - 10 * 60_000),
    source: 'device',
    spo2: 84,
    trace: 'noisy',
    recordedBy: null,
    fio2: 0.32,
    fio2Estimated: true,
    device: 'nasal_cannula',
    flowLpm: 3,
  }),
  obs({ id: 120, takenAt: iso(T0 - 30 * 60_000), spo2: 94, replacesId: 101, recordedBy: 'Nurse Rowan Pike' }),
  obs({ id: 110, takenAt: iso(T0 - 40 * 60_000), spo2: 89, heartRate: 97 }),
  obs({
    id: 101,
    takenAt: iso(T0 - 30 * 60_000),
    spo2: 49,
    status: 'superseded',
    replacedById: 120,
    statusReason: 'Typed 49 for 94',
    statusBy: 'Nurse Rowan Pike',
    statusAt: iso(T0 - 20 * 60_000),
  }),
  obs({
    id: 99,
    takenAt: iso(T0 - 60 * 60_000),
    spo2: 97,
    status: 'entered_in_error',
    statusReason: 'Charted on the wrong patient',
    statusBy: 'Nurse Tamsin Hale',
    statusAt: iso(T0 - 50 * 60_000),
  }),
];

function setup(
  opts: { canChart?: boolean; total?: number; errorPost?: (c: StubCall) => { status?: number; body: unknown } } = {},
) {
  const page = (n: number): ObsPage => ({
    items: n === 1 ? rows : [obs({ id: 50, takenAt: iso(T0 - 5 * 3_600_000), spo2: 91 })],
    page: n,
    pageSize: 20,
    total: opts.total ?? rows.length,
  });
  const stub = stubFetch({
    'GET /api/patients/3/observations?page=1&pageSize=20': () => ({ body: page(1) }),
    'GET /api/patients/3/observations?page=2&pageSize=20': () => ({ body: page(2) }),
    'POST /api/observations/110/entered-in-error':
      opts.errorPost ?? (() => ({ body: { observation: { ...rows[2], status: 'entered_in_error' } } })),
  });
  vi.stubGlobal('fetch', vi.fn(stub.fn));
  render(
    <Fresh>
      <ObsRecordTable
        patientId={3}
        timeZone="Europe/London"
        canChart={opts.canChart ?? true}
        orders={[order({ low: 92, high: 96, orderedAt: iso(T0 - 10 * 3_600_000) })]}
      />
    </Fresh>,
  );
  return stub;
}

const row = (id: number) => document.getElementById(`obs-${id}`) as HTMLTableRowElement;

describe('ObsRecordTable', () => {
  it('keeps a corrected row, struck through, with who, why and a link to its correction', async () => {
    setup();
    await waitFor(() => expect(row(101)).toBeTruthy());
    const r = row(101);
    expect(r.dataset.status).toBe('superseded');
    // The values are struck through: <s> elements and the line-through class.
    expect(r.querySelectorAll('s').length).toBeGreaterThanOrEqual(10);
    expect(within(r).getByText('49 %').closest('s')).not.toBeNull();
    expect(r.querySelector('td')!.className).toContain('line-through');
    const status = screen.getByTestId('status-101').textContent!;
    expect(status).toMatch(/corrected/i);
    expect(status).toContain('Typed 49 for 94');
    expect(status).toContain('Nurse Rowan Pike');
    const link = within(r).getByRole('link', { name: /correcting row/i });
    expect(link.getAttribute('href')).toBe('#obs-120');
    // The correcting row says what it replaced.
    expect(
      within(row(120))
        .getByRole('link', { name: /corrects an earlier row/i })
        .getAttribute('href'),
    ).toBe('#obs-101');
  });

  it('keeps an entered-in-error row, struck through, with the reason', async () => {
    setup();
    await waitFor(() => expect(row(99)).toBeTruthy());
    const r = row(99);
    expect(within(r).getByText('97 %').closest('s')).not.toBeNull();
    const status = screen.getByTestId('status-99').textContent!;
    expect(status).toMatch(/entered in error/i);
    expect(status).toContain('Charted on the wrong patient');
    expect(status).toContain('Nurse Tamsin Hale');
    // Current rows are not struck.
    expect(row(110).querySelectorAll('s')).toHaveLength(0);
    expect(screen.getAllByRole('row')).toHaveLength(1 + rows.length);
  });

  it('marks untrusted readings with a hatched mark and the word, and estimated FiO₂ with est.', async () => {
    setup();
    await waitFor(() => expect(row(130)).toBeTruthy());
    const r = row(130);
    expect(r.querySelector('[data-untrusted]')!.textContent).toContain('untrusted · noisy trace');
    expect(within(r).getByText('0.32 est.')).toBeTruthy();
    expect(within(r).getByText('monitor', { selector: 'td' })).toBeTruthy();
    // A trusted reading below the band in force gets the below-band mark and words.
    expect(row(110).querySelector('[data-state="below"]')!.textContent).toBe('below band');
  });

  it('offers Correct and Entered in error only on current charted rows', async () => {
    setup();
    await waitFor(() => expect(row(110)).toBeTruthy());
    expect(within(row(110)).getByRole('button', { name: /^Correct/ })).toBeTruthy();
    expect(within(row(120)).getByRole('button', { name: /^Entered in error/ })).toBeTruthy();
    expect(within(row(101)).queryByRole('button')).toBeNull();
    expect(within(row(99)).queryByRole('button')).toBeNull();
    expect(within(row(130)).queryByRole('button')).toBeNull(); // monitor reading
  });

  it('offers no actions to a user who may not chart', async () => {
    setup({ canChart: false });
    await waitFor(() => expect(row(110)).toBeTruthy());
    expect(screen.queryByRole('button', { name: /^Correct/ })).toBeNull();
    expect(screen.queryByRole('button', { name: /^Entered in error/ })).toBeNull();
  });

  it('marks entered in error only with a reason, then refreshes the record', async () => {
    const stub = setup();
    await waitFor(() => expect(row(110)).toBeTruthy());
    fireEvent.click(within(row(110)).getByRole('button', { name: /^Entered in error/ }));
    const reason = screen.getByLabelText('Reason this entry is in error');
    fireEvent.click(screen.getByRole('button', { name: 'Mark entered in error' }));
    expect(screen.getByText('Give the reason this entry is in error')).toBeTruthy();
    expect(reason.getAttribute('aria-invalid')).toBe('true');
    expect(stub.calls.filter((c) => c.method === 'POST')).toHaveLength(0);
    const getsBefore = stub.calls.filter((c) => c.method === 'GET').length;
    fireEvent.change(reason, { target: { value: 'Wrong bed' } });
    fireEvent.click(screen.getByRole('button', { name: 'Mark entered in error' }));
    await waitFor(() => expect(screen.getByRole('status').textContent).toBe('Marked entered in error'));
    const post = stub.calls.find((c) => c.method === 'POST')!;
    expect(post.url).toBe('/api/observations/110/entered-in-error');
    expect(post.body).toEqual({ reason: 'Wrong bed' });
    await waitFor(() => expect(stub.calls.filter((c) => c.method === 'GET').length).toBeGreaterThan(getsBefore));
  });

  it('opens the entry form prefilled to correct a row', async () => {
    setup();
    await waitFor(() => expect(row(110)).toBeTruthy());
    fireEvent.click(within(row(110)).getByRole('button', { name: /^Correct/ }));
    const form = screen.getByTestId('obs-correct-form');
    expect((within(form).getByLabelText('SpO₂ (%)') as HTMLInputElement).value).toBe('89');
    expect((within(form).getByLabelText('Heart rate (/min)') as HTMLInputElement).value).toBe('97');
    expect(within(form).getByLabelText('Reason for the correction')).toBeTruthy();
  });

  it('pages 20 at a time with Previous and Next', async () => {
    const stub = setup({ total: 45 });
    await waitFor(() => expect(screen.getByText(/Page 1 of 3 · 45 obs/)).toBeTruthy());
    expect((screen.getByRole('button', { name: 'Previous' }) as HTMLButtonElement).disabled).toBe(true);
    fireEvent.click(screen.getByRole('button', { name: 'Next' }));
    await waitFor(() => expect(row(50)).toBeTruthy());
    expect(stub.calls.some((c) => c.url === '/api/patients/3/observations?page=2&pageSize=20')).toBe(true);
    expect(screen.getByText(/Page 2 of 3/)).toBeTruthy();
  });
});
