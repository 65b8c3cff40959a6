// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen, waitFor, within } from '@testing-library/react';
import TargetOrderPanel, { STALE_ORDER_MESSAGE } from './TargetOrderPanel.tsx';
import { Fresh, T0, iso, order, stubFetch, type StubCall } from './fixtures.tsx';
import type { OrderView } from '~/lib/charting/api-types.ts';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const first: OrderView[] = [
  order({
    id: 7,
    low: 92,
    high: 96,
    preset: 'tsanz_most',
    reason: 'Pneumonia, improving',
    orderedBy: 'Dr Imogen Vale',
  }),
  order({
    id: 6,
    low: 94,
    high: 98,
    preset: 'bts_most',
    reason: 'Admission',
    orderedAt: iso(T0 - 30 * 3_600_000),
    orderedBy: 'Dr Osric Lamb',
    supersedesId: null,
  }),
];
const newer = order({
  id: 8,
  low: 88,
  high: 92,
  preset: 'bts_hypercapnic',
  news2Scale: 2,
  reason: 'CO₂ retention on gas',
  orderedAt: iso(T0 - 60_000),
  orderedBy: 'Dr Nell Farrow',
  supersedesId: 7,
});

function setup(opts: { canOrder?: boolean; post?: (c: StubCall) => { status?: number; body: unknown } } = {}) {
  let served = first;
  const stub = stubFetch({
    'GET /api/patients/3/targets': () => ({ body: { orders: served } }),
    'POST /api/patients/3/targets': (c) => {
      const r = opts.post ? opts.post(c) : { status: 201, body: { order: { ...newer, id: 9 } } };
      if (r.status === 409) served = [newer, ...first];
      return r;
    },
  });
  vi.stubGlobal('fetch', vi.fn(stub.fn));
  render(
    <Fresh>
      <TargetOrderPanel patientId={3} timeZone="Europe/London" canOrder={opts.canOrder ?? true} initialOrders={first} />
    </Fresh>,
  );
  return stub;
}

const field = (label: string) => screen.getByLabelText(label) as HTMLInputElement;
const posts = (calls: StubCall[]) => calls.filter((c) => c.method === 'POST');

describe('TargetOrderPanel', () => {
  it('shows the band in force large and every order, newest first, with who and why', () => {
    setup({ canOrder: false });
    expect(screen.getByTestId('current-band').textContent).toContain('92–96');
    const items = within(screen.getByTestId('order-history')).getAllByRole('listitem');
    expect(items.map((li) => li.getAttribute('data-order-id'))).toEqual(['7', '6']);
    expect(items[0]!.textContent).toContain('Dr Imogen Vale');
    expect(items[1]!.textContent).toContain('Admission');
    expect(items[1]!.textContent).toContain('Dr Osric Lamb');
  });

  it('does not show the order form when the user may not order', () => {
    setup({ canOrder: false });
    expect(screen.queryByTestId('order-form')).toBeNull();
    expect(screen.queryByRole('button', { name: /Order band/ })).toBeNull();
    expect(screen.queryByLabelText('Lower limit (%)')).toBeNull();
  });

  it('labels each preset with its source and fills the limits from it', () => {
    setup();
    const bts = screen.getByRole('button', { name: /^94–98 % · BTS 2017/ });
    expect(screen.getByRole('button', { name: /^92–96 % · TSANZ 2015/ })).toBeTruthy();
    fireEvent.click(bts);
    expect(field('Lower limit (%)').value).toBe('94');
    expect(field('Upper limit (%)').value).toBe('98');
    expect(bts.getAttribute('aria-pressed')).toBe('true');
    fireEvent.click(screen.getByRole('button', { name: /^88–92 % · BTS 2017/ }));
    expect(field('Lower limit (%)').value).toBe('88');
    expect(field('Upper limit (%)').value).toBe('92');
    expect(bts.getAttribute('aria-pressed')).toBe('false');
    // Changing a number lets go of the preset, so the schema does not refuse a mismatch.
    fireEvent.change(field('Lower limit (%)'), { target: { value: '87' } });
    expect(screen.getByRole('button', { name: /^88–92 % · BTS 2017/ }).getAttribute('aria-pressed')).toBe('false');
  });

  it('posts the order with the preset and the newest order id seen', async () => {
    const stub = setup();
    fireEvent.click(screen.getByRole('button', { name: /^94–98 % · BTS 2017/ }));
    fireEvent.change(field('Reason for this band'), { target: { value: 'Off high-flow, settled' } });
    fireEvent.click(screen.getByRole('button', { name: 'Order band' }));
    await waitFor(() => expect(posts(stub.calls)).toHaveLength(1));
    expect(posts(stub.calls)[0]!.body).toEqual({
      low: 94,
      high: 98,
      preset: 'bts_most',
      reason: 'Off high-flow, settled',
      news2Scale: 1,
      basedOnOrderId: 7,
    });
    await waitFor(() => expect(screen.getByRole('status').textContent).toBe('Band 94–98 % ordered'));
    expect(field('Lower limit (%)').value).toBe('');
  });

  it('needs a reason, and says so in the schema’s words', () => {
    const stub = setup();
    fireEvent.change(field('Lower limit (%)'), { target: { value: '90' } });
    fireEvent.change(field('Upper limit (%)'), { target: { value: '94' } });
    fireEvent.click(screen.getByRole('button', { name: 'Order band' }));
    expect(screen.getByText('Give the reason for this band')).toBeTruthy();
    expect(field('Reason for this band').getAttribute('aria-invalid')).toBe('true');
    expect(posts(stub.calls)).toHaveLength(0);
  });

  it('asks for a scale reason only for Scale 2 with a band above 92 %', () => {
    setup();
    fireEvent.click(screen.getByRole('button', { name: /^88–92 % · BTS 2017/ }));
    expect(screen.getByTestId('scale-hint').textContent).toMatch(/Scale 2 fits this band/);
    fireEvent.click(screen.getByLabelText('Scale 2'));
    expect(screen.queryByLabelText('Reason for Scale 2 with this band')).toBeNull();
    fireEvent.click(screen.getByRole('button', { name: /^92–96 % · TSANZ 2015/ }));
    expect(screen.getByTestId('scale-hint').textContent).toMatch(/needs a reason/);
    expect(screen.getByLabelText('Reason for Scale 2 with this band')).toBeTruthy();
    fireEvent.change(field('Reason for this band'), { target: { value: 'Known CO₂ retainer' } });
    fireEvent.click(screen.getByRole('button', { name: 'Order band' }));
    expect(screen.getByText('Scale 2 with a band above 92 % needs a reason')).toBeTruthy();
  });

  it('on 409 says someone ordered in between, refreshes the history and bases the next order on the new one', async () => {
    let n = 0;
    const stub = setup({
      post: () =>
        ++n === 1
          ? { status: 409, body: { error: { code: 'stale_order', message: 'A newer order exists' } } }
          : { status: 201, body: {} },
    });
    const gets = () => stub.calls.filter((c) => c.method === 'GET').length;
    // Let the first load settle, so the refreshed history below can only come from the 409 handling.
    await waitFor(() => expect(gets()).toBe(1));
    await new Promise((r) => setTimeout(r, 20));
    fireEvent.click(screen.getByRole('button', { name: /^94–98 % · BTS 2017/ }));
    fireEvent.change(field('Reason for this band'), { target: { value: 'Off high-flow, settled' } });
    fireEvent.click(screen.getByRole('button', { name: 'Order band' }));
    await waitFor(() => expect(screen.getByRole('alert').textContent).toBe(STALE_ORDER_MESSAGE));
    await waitFor(() => expect(gets()).toBe(2));
    expect(STALE_ORDER_MESSAGE).toBe(
      'Someone ordered a new band while you were editing — the history is refreshed; check it and order again',
    );
    expect((posts(stub.calls)[0]!.body as { basedOnOrderId: number }).basedOnOrderId).toBe(7);
    // The history now shows the order that came in between.
    await waitFor(() => expect(screen.getByTestId('current-band').textContent).toContain('88–92'));
    expect(within(screen.getByTestId('order-history')).getAllByRole('listitem')[0]!.textContent).toContain(
      'Dr Nell Farrow',
    );
    // The typed order stays; ordering again is based on the order now in force.
    expect(field('Lower limit (%)').value).toBe('94');
    fireEvent.click(screen.getByRole('button', { name: 'Order band' }));
    await waitFor(() => expect(posts(stub.calls)).toHaveLength(2));
    expect((posts(stub.calls)[1]!.body as { basedOnOrderId: number }).basedOnOrderId).toBe(8);
  });

  it('shows the server’s field errors against the inputs', async () => {
    setup({
      post: () => ({
        status: 400,
        body: {
          error: {
            code: 'invalid',
            message: 'Check the band',
            fields: { high: 'The upper limit must be at least 2 points above the lower' },
          },
        },
      }),
    });
    fireEvent.change(field('Lower limit (%)'), { target: { value: '90' } });
    fireEvent.change(field('Upper limit (%)'), { target: { value: '94' } });
    fireEvent.change(field('Reason for this band'), { target: { value: 'Trial' } });
    fireEvent.click(screen.getByRole('button', { name: 'Order band' }));
    await waitFor(() =>
      expect(screen.getByText('The upper limit must be at least 2 points above the lower')).toBeTruthy(),
    );
    expect(field('Upper limit (%)').getAttribute('aria-invalid')).toBe('true');
    expect(screen.getByRole('alert').textContent).toContain('Check the band');
  });
});
