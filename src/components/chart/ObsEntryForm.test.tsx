// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import ObsEntryForm from './ObsEntryForm.tsx';
import { Fresh, T0, iso, obs, stubFetch, type StubCall } from './fixtures.tsx';
import type { ObsView } from '~/lib/charting/api-types.ts';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

// A correction posts { reason, obs }; a new obs posts the obs itself.
const savedObs = (posted: Record<string, unknown>): ObsView => {
  const body = (posted.obs ?? posted) as Record<string, unknown>;
  return obs({
    id: 555,
    takenAt: String(body.takenAt),
    spo2: (body.spo2 as number) ?? null,
    notices: (body.spo2 as number) < 70 ? ['Below calibrated range — confirm with arterial blood gas'] : [],
  });
};

function setup(
  opts: {
    lastCharted?: ObsView | null;
    correcting?: ObsView;
    post?: (c: StubCall) => { status?: number; body: unknown };
    timeZone?: string;
  } = {},
) {
  const post =
    opts.post ??
    ((c: StubCall) => ({ status: 201, body: { observation: savedObs(c.body as Record<string, unknown>) } }));
  const stub = stubFetch({
    'POST /api/patients/3/observations': post,
    [`POST /api/observations/${opts.correcting?.id ?? 0}/correct`]: post,
  });
  vi.stubGlobal('fetch', vi.fn(stub.fn));
  const onSaved = vi.fn();
  const utils = render(
    <Fresh>
      <ObsEntryForm
        patientId={3}
        lastCharted={opts.lastCharted === undefined ? obs() : opts.lastCharted}
        correcting={opts.correcting}
        timeZone={opts.timeZone ?? 'Europe/London'}
        onSaved={onSaved}
        now={() => new Date(T0)}
      />
    </Fresh>,
  );
  return { ...utils, calls: stub.calls, onSaved };
}

const input = (label: string | RegExp) => screen.getByLabelText(label) as HTMLInputElement;
const type = (label: string | RegExp, value: string) => fireEvent.change(input(label), { target: { value } });
const save = () => fireEvent.click(screen.getByRole('button', { name: /save obs/i }));
const posts = (calls: StubCall[]) => calls.filter((c) => c.method === 'POST');

/** The error text an input points at through aria-describedby. */
function describedErrors(el: HTMLElement): string {
  const ids = (el.getAttribute('aria-describedby') ?? '').split(' ').filter(Boolean);
  return ids
    .map((id) => document.getElementById(id))
    .filter((n) => n?.hasAttribute('data-field-error'))
    .map((n) => n!.textContent)
    .join(' | ');
}

describe('ObsEntryForm', () => {
  it('defaults device and FiO₂ from the last charted obs, FiO₂ shown as a percentage', () => {
    setup({ lastCharted: obs({ device: 'simple_mask', fio2: 0.4, flowLpm: 6 }) });
    expect((screen.getByLabelText('Oxygen device') as HTMLSelectElement).value).toBe('simple_mask');
    expect(input('FiO₂').value).toBe('40');
    expect(input('Flow (L/min)').value).toBe('6');
    expect(input('Date taken').value).toMatch(/^\d{4}-\d\d-\d\d$/);
    expect(input('Time taken').value).toMatch(/^\d\d:\d\d$/);
  });

  describe('time taken: date + 24-hour HH:MM in the unit zone (issue 10 point 8)', () => {
    const wall = (ms: number, timeZone: string) => {
      const p = Object.fromEntries(
        new Intl.DateTimeFormat('en-GB', {
          timeZone,
          year: 'numeric',
          month: '2-digit',
          day: '2-digit',
          hour: '2-digit',
          minute: '2-digit',
          hourCycle: 'h23',
        })
          .formatToParts(new Date(ms))
          .map((x) => [x.type, x.value]),
      );
      return { date: `${p.year}-${p.month}-${p.day}`, time: `${p.hour}:${p.minute}` };
    };

    it('defaults to now in the unit zone (not the browser zone), and never uses the browser date-time widget', () => {
      setup({ timeZone: 'America/New_York' });
      expect(input('Date taken').value).toBe(wall(T0, 'America/New_York').date);
      expect(input('Time taken').value).toBe(wall(T0, 'America/New_York').time);
      expect(input('Time taken').type).toBe('text');
      // No browser date or time widget of any kind (they follow the browser's locale).
      expect(
        document.querySelector(
          ['datetime' + '-local', 'date', 'time'].map((type) => `input[type="${type}"]`).join(', '),
        ),
      ).toBeNull();
    });

    it('−5 and −15 min step back from now; Now returns', () => {
      setup();
      fireEvent.click(screen.getByRole('button', { name: '15 minutes ago' }));
      expect(input('Time taken').value).toBe(wall(T0 - 15 * 60_000, 'Europe/London').time);
      fireEvent.click(screen.getByRole('button', { name: '5 minutes ago' }));
      expect(input('Time taken').value).toBe(wall(T0 - 5 * 60_000, 'Europe/London').time);
      fireEvent.click(screen.getByRole('button', { name: 'Now' }));
      expect(input('Time taken').value).toBe(wall(T0, 'Europe/London').time);
    });

    it('reads a typed 24-hour time in the unit zone and posts it as UTC', async () => {
      const { calls } = setup({ timeZone: 'America/New_York' });
      const tenAgo = wall(T0 - 10 * 60_000, 'America/New_York');
      type('Time taken', tenAgo.time.replace(':', '')); // "0604" typed without the colon
      expect(screen.getByTestId('taken-at-reads').textContent).toMatch(
        /^Reads \d{1,2} [A-Z][a-z]{2} \d\d:\d\d \(unit time\)/,
      );
      type('SpO₂ (%)', '95');
      save();
      await waitFor(() => expect(posts(calls)).toHaveLength(1));
      expect((posts(calls)[0]!.body as { takenAt: string }).takenAt).toBe(
        iso(Math.floor((T0 - 10 * 60_000) / 60_000) * 60_000),
      );
    });

    it('a 12-hour time is refused in words and nothing is posted', () => {
      const { calls } = setup();
      type('Time taken', '6:14 PM');
      type('SpO₂ (%)', '95');
      save();
      expect(describedErrors(input('Time taken'))).toBe('Time taken must be a 24-hour time such as 06:14');
      expect(posts(calls)).toHaveLength(0);
    });
  });

  it('does not offer an estimated FiO₂ as if it had been charted', () => {
    setup({ lastCharted: obs({ device: 'nasal_cannula', fio2: 0.29, fio2Estimated: true, flowLpm: 2 }) });
    expect((screen.getByLabelText('Oxygen device') as HTMLSelectElement).value).toBe('nasal_cannula');
    expect(input('FiO₂').value).toBe('');
  });

  it('hides flow for room air and shows it for a flow device', () => {
    setup({ lastCharted: obs({ device: 'room_air', fio2: 0.21, flowLpm: null }) });
    expect(screen.queryByLabelText('Flow (L/min)')).toBeNull();
    fireEvent.change(screen.getByLabelText('Oxygen device'), { target: { value: 'nasal_cannula' } });
    expect(screen.getByLabelText('Flow (L/min)')).toBeTruthy();
    fireEvent.change(screen.getByLabelText('Oxygen device'), { target: { value: 'ventilator' } });
    expect(screen.queryByLabelText('Flow (L/min)')).toBeNull();
  });

  it.each([
    ['SpO₂ (%)', '101', 'SpO₂ over 100 % is not plausible — check the reading'],
    ['Heart rate (/min)', '301', 'Heart rate over 300/min is not plausible — check the reading'],
    ['FiO₂', '0.15', 'FiO₂ cannot be under 21 % (0.21) — room air is 21 %'],
    ['FiO₂', '15', 'FiO₂ cannot be under 21 % (0.21) — room air is 21 %'],
  ])('shows the schema words against %s = %s and posts nothing', (label, value, words) => {
    const { calls } = setup();
    type('SpO₂ (%)', '95');
    type(label, value);
    save();
    const el = input(label);
    expect(el.getAttribute('aria-invalid')).toBe('true');
    expect(describedErrors(el)).toBe(words);
    expect(posts(calls)).toHaveLength(0);
    // The other fields are not marked.
    expect(input('Respiratory rate (/min)').getAttribute('aria-invalid')).toBeNull();
  });

  it.each([['40'], ['0.4'], ['40 '], ['0,4']])(
    'posts FiO₂ typed as %j as the fraction 0.4 (the schema output)',
    async (typed) => {
      const { calls } = setup({ lastCharted: obs({ device: 'simple_mask', fio2: 0.6, flowLpm: 8 }) });
      type('SpO₂ (%)', '93');
      type('FiO₂', typed);
      save();
      await waitFor(() => expect(posts(calls)).toHaveLength(1));
      const body = posts(calls)[0]!.body as Record<string, unknown>;
      expect(body.fio2).toBe(0.4);
      expect(body.spo2).toBe(93);
      expect(body.device).toBe('simple_mask');
      expect(body.flowLpm).toBe(8);
      expect(body.trace).toBe('clean');
      expect(body.takenAt).toBe(iso(T0));
      // Empty fields are left out, not sent as "".
      expect('heartRate' in body).toBe(false);
    },
  );

  it('shows the calibrated-range notice for SpO₂ 65 and still posts it', async () => {
    const { calls } = setup();
    type('SpO₂ (%)', '65');
    expect(screen.getByTestId('spo2-notice').textContent).toContain(
      'Below calibrated range — confirm with arterial blood gas',
    );
    expect(input('SpO₂ (%)').getAttribute('aria-describedby')).toContain(
      screen.getByTestId('spo2-notice').parentElement!.id,
    );
    save();
    await waitFor(() => expect(posts(calls)).toHaveLength(1));
    expect((posts(calls)[0]!.body as { spo2: number }).spo2).toBe(65);
    await waitFor(() => expect(screen.getByRole('status').textContent).toContain('Below calibrated range'));
  });

  it('does not show the notice at 70', () => {
    setup();
    type('SpO₂ (%)', '70');
    expect(screen.queryByTestId('spo2-notice')).toBeNull();
  });

  it('puts the server’s field errors against the right inputs', async () => {
    setup({
      post: () => ({
        status: 400,
        body: {
          error: {
            code: 'invalid',
            message: 'Check the highlighted fields',
            fields: {
              'obs.heartRate': 'Heart rate disagrees with the monitor',
              takenAt: 'Obs can be back-dated by 4 hours at most',
            },
          },
        },
      }),
    });
    type('SpO₂ (%)', '95');
    type('Heart rate (/min)', '80');
    save();
    await waitFor(() => expect(screen.getByRole('alert').textContent).toContain('Check the highlighted fields'));
    expect(describedErrors(input('Heart rate (/min)'))).toBe('Heart rate disagrees with the monitor');
    expect(describedErrors(input('Time taken'))).toBe('Obs can be back-dated by 4 hours at most');
    expect(input('SpO₂ (%)').getAttribute('aria-invalid')).toBeNull();
    // The typed values stay for the nurse to fix.
    expect(input('Heart rate (/min)').value).toBe('80');
  });

  it('saves on Enter in an input', async () => {
    const { calls } = setup();
    type('SpO₂ (%)', '96');
    fireEvent.keyDown(input('Respiratory rate (/min)'), { key: 'Enter', code: 'Enter' });
    await waitFor(() => expect(posts(calls)).toHaveLength(1));
    expect((posts(calls)[0]!.body as { spo2: number }).spo2).toBe(96);
  });

  it('after saving clears the vitals, keeps device and FiO₂, focuses SpO₂ and says Saved', async () => {
    const { calls, onSaved } = setup({ lastCharted: obs({ device: 'simple_mask', fio2: 0.4, flowLpm: 6 }) });
    type('SpO₂ (%)', '94');
    type('Heart rate (/min)', '91');
    type('Temperature (°C)', '37.9');
    fireEvent.change(screen.getByLabelText('Trace quality'), { target: { value: 'weak' } });
    input('Note').focus();
    save();
    await waitFor(() => expect(screen.getByRole('status').textContent).toMatch(/^Saved/));
    expect(posts(calls)).toHaveLength(1);
    expect(onSaved).toHaveBeenCalledTimes(1);
    expect(input('SpO₂ (%)').value).toBe('');
    expect(input('Heart rate (/min)').value).toBe('');
    expect(input('Temperature (°C)').value).toBe('');
    expect((screen.getByLabelText('Trace quality') as HTMLSelectElement).value).toBe('clean');
    expect((screen.getByLabelText('Oxygen device') as HTMLSelectElement).value).toBe('simple_mask');
    expect(input('FiO₂').value).toBe('40');
    expect(document.activeElement).toBe(input('SpO₂ (%)'));
  });

  it('asks for SpO₂ or an absent trace', () => {
    const { calls } = setup();
    save();
    expect(describedErrors(input('SpO₂ (%)'))).toBe('Enter SpO₂, or set the trace to "absent" if there is no reading');
    expect(posts(calls)).toHaveLength(0);
    expect(document.activeElement).toBe(input('SpO₂ (%)'));
  });

  it('corrects an obs: prefilled, needs a reason, posts { reason, obs } to /correct', async () => {
    const original = obs({
      id: 101,
      takenAt: iso(T0 - 30 * 60_000),
      spo2: 49,
      heartRate: 88,
      fio2: 0.4,
      device: 'simple_mask',
    });
    const { calls } = setup({ correcting: original });
    expect(input('SpO₂ (%)').value).toBe('49');
    expect(input('Heart rate (/min)').value).toBe('88');
    fireEvent.click(screen.getByRole('button', { name: /save correction/i }));
    expect(describedErrors(input('Reason for the correction'))).toBe('Give the reason for the correction');
    expect(posts(calls)).toHaveLength(0);
    type('SpO₂ (%)', '94');
    type('Reason for the correction', 'Typed 49 for 94');
    fireEvent.click(screen.getByRole('button', { name: /save correction/i }));
    await waitFor(() => expect(posts(calls)).toHaveLength(1));
    expect(posts(calls)[0]!.url).toBe('/api/observations/101/correct');
    const body = posts(calls)[0]!.body as { reason: string; obs: Record<string, unknown> };
    expect(body.reason).toBe('Typed 49 for 94');
    expect(body.obs.spo2).toBe(94);
    expect(body.obs.fio2).toBe(0.4);
    expect(body.obs.takenAt).toBe(iso(T0 - 30 * 60_000));
  });
});
