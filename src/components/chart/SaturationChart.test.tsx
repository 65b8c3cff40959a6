// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import SaturationChart, { bandAt, chartSummary, timeTicks } from './SaturationChart.tsx';
import DerivedFigures from './DerivedFigures.tsx';
import { gasMarksOf } from './BedChartPage.tsx';
import { T0, series } from './fixtures.tsx';

afterEach(() => cleanup());

describe('SaturationChart', () => {
  it('shows the window buttons with 12 h pressed, and changes window on click', () => {
    const onHoursChange = vi.fn();
    render(
      <SaturationChart
        series={series()}
        timeZone="Europe/London"
        hours={12}
        onHoursChange={onHoursChange}
        size={{ width: 800, height: 320 }}
      />,
    );
    const group = screen.getByRole('group', { name: 'Chart window' });
    const buttons = Array.from(group.querySelectorAll('button'));
    expect(buttons.map((b) => b.textContent)).toEqual(['6 h', '12 h', '24 h', '72 h']);
    expect(buttons.map((b) => b.getAttribute('aria-pressed'))).toEqual(['false', 'true', 'false', 'false']);
    fireEvent.click(screen.getByRole('button', { name: '72 h' }));
    expect(onHoursChange).toHaveBeenCalledWith(72);
  });

  it('says in words what the chart shows, in the unit’s time zone', () => {
    render(
      <SaturationChart
        series={series()}
        timeZone="Europe/London"
        hours={12}
        onHoursChange={() => {}}
        size={{ width: 800, height: 320 }}
      />,
    );
    const summary = screen.getByTestId('chart-summary');
    expect(summary.className).toContain('sr-only');
    // 12:00Z on 12 March is 12:00 in London (GMT); the latest reading is 10 min earlier.
    expect(summary.textContent).toBe(
      'SpO₂ over the last 12 h (00:00 to 12:00, unit time): 4312 readings; latest 90 % at 11:50, below band 92–96 %. ' +
        'Time in band 75 %; 95 min below band, 15 min above; 312 untrusted readings. Heart rate latest 104/min. FiO₂ latest 0.50. ' +
        'The band changed once. 1 escalation in this window.',
    );
    expect(screen.getByRole('figure').getAttribute('aria-describedby')).toBe(summary.id);
    expect(screen.getByTestId('reading-counts').textContent).toContain('4 readings shown of 4312');
    // The latest state in words and mark, not colour alone.
    const latest = screen.getByTestId('latest-spo2');
    expect(latest.textContent).toContain('90 %');
    expect(latest.querySelector('[data-state="below"]')!.textContent).toBe('below band');
  });

  it("heads the chart with the newest reading itself and its source, not the last drawn point (a minute's mean on long windows)", () => {
    const s = series({ newestReading: { t: T0 - 30_000, v: 86, trusted: true, source: 'device' } });
    s.spo2[s.spo2.length - 1] = { t: T0 - 60_000, v: 86.8, trusted: true, source: 'device' };
    render(
      <SaturationChart
        series={s}
        timeZone="Europe/London"
        hours={12}
        onHoursChange={() => {}}
        size={{ width: 800, height: 320 }}
      />,
    );
    const latest = screen.getByTestId('latest-spo2');
    expect(latest.textContent).toContain('86 %');
    expect(latest.textContent).not.toContain('86.8');
    expect(latest.textContent).toContain('monitor at');
  });

  it('draws blood gases as SaO₂ diamonds, ringed and named when the pair shows occult hypoxaemia', () => {
    const gases = [
      { id: 1, t: T0 - 3 * 3_600_000, sao2: 91, spo2AtSample: 95, sampleType: 'arterial' as const, occult: false },
      { id: 2, t: T0 - 60 * 60_000, sao2: 86, spo2AtSample: 93, sampleType: 'arterial' as const, occult: true },
    ];
    const s = series({ bloodGases: gases });
    const { container } = render(
      <SaturationChart
        series={s}
        timeZone="Europe/London"
        hours={12}
        onHoursChange={() => {}}
        size={{ width: 800, height: 320 }}
        extraMarks={{ name: 'SaO₂ (blood gas)', marks: gasMarksOf(s) }}
      />,
    );
    expect(container.querySelectorAll('[data-testid="panel-spo2"] [data-mark="extra"]:not([data-flag])')).toHaveLength(
      1,
    );
    const occult = container.querySelectorAll(
      '[data-testid="panel-spo2"] [data-mark="extra"][data-flag="occult hypoxaemia"]',
    );
    expect(occult).toHaveLength(1);
    expect(occult[0]!.querySelector('circle')).not.toBeNull(); // ringed
    expect(occult[0]!.textContent).toBe('occult hypoxaemia'); // and named beside the mark
    expect(screen.getByTestId('chart-summary').textContent).toContain(
      'Blood gas at 11:00: SaO₂ 86 % while SpO₂ read 93 % — occult hypoxaemia.',
    );
  });

  it('uses the unit’s zone, not the browser’s, for times', () => {
    const s = chartSummary(series(), 'Australia/Sydney');
    // 11:50Z on 12 March is 22:50 in Sydney (AEDT, +11).
    expect(s).toContain('latest 90 % at 22:50');
  });

  it('draws trusted readings filled and untrusted hollow when given a size', () => {
    const { container } = render(
      <SaturationChart
        series={series()}
        timeZone="Europe/London"
        hours={12}
        onHoursChange={() => {}}
        size={{ width: 800, height: 320 }}
      />,
    );
    const svg = container.querySelector('svg.recharts-surface');
    expect(svg).not.toBeNull();
    const hollow = container.querySelectorAll('[data-mark="untrusted"]');
    expect(hollow).toHaveLength(1);
    expect(hollow[0]!.getAttribute('fill')).toBe('none');
    expect(container.querySelectorAll('[data-mark="below"]')).toHaveLength(2); // 89 and 90 under 92–96
    expect(container.querySelectorAll('[data-mark="in"]')).toHaveLength(1); // 95 in 94–98
  });

  it('draws SpO₂ alone in its panel, heart rate and FiO₂ (labelled with device and flow) in their own', () => {
    const { container } = render(
      <SaturationChart
        series={series()}
        timeZone="Europe/London"
        hours={12}
        onHoursChange={() => {}}
        size={{ width: 800, height: 320 }}
      />,
    );
    const spo2 = container.querySelector('[data-testid="panel-spo2"]')!;
    const hr = container.querySelector('[data-testid="panel-hr"]')!;
    const o2 = container.querySelector('[data-testid="panel-o2"]')!;
    // One line (SpO₂) on the SpO₂ panel, one on each of the others: no second scale anywhere.
    expect(spo2.querySelectorAll('.recharts-line')).toHaveLength(1);
    expect(spo2.querySelectorAll('.recharts-yAxis')).toHaveLength(1);
    expect(hr.querySelectorAll('.recharts-line')).toHaveLength(1);
    expect(o2.querySelectorAll('.recharts-line')).toHaveLength(1);
    const labels = [...o2.querySelectorAll('[data-fio2-label]')].map((t) => t.textContent);
    expect(labels).toEqual(['0.35 Simple mask 6 L/min', '0.50 High-flow nasal 40 L/min']);
    // Charted obs are drawn apart from device readings.
    expect(spo2.querySelectorAll('[data-source="charted"]').length).toBe(2);
  });

  it('shows a band ordered a second ago as a visible step', () => {
    const s = series();
    s.bands = [
      { ...s.bands[0]!, to: s.to - 1000 },
      { from: s.to - 1000, to: s.to, low: 88, high: 92 },
    ];
    const { container } = render(
      <SaturationChart
        series={s}
        timeZone="Europe/London"
        hours={12}
        onHoursChange={() => {}}
        size={{ width: 800, height: 320 }}
      />,
    );
    const rects = [...container.querySelectorAll('[data-testid="panel-spo2"] .recharts-reference-area-rect')];
    expect(rects).toHaveLength(2);
    expect(Number(rects[1]!.getAttribute('width'))).toBeGreaterThan(15);
  });

  it('reads every value at a time from the keyboard', () => {
    render(
      <SaturationChart
        series={series()}
        timeZone="Europe/London"
        hours={12}
        onHoursChange={() => {}}
        size={{ width: 800, height: 320 }}
      />,
    );
    const area = screen.getByTestId('chart-area');
    expect(area.getAttribute('tabindex')).toBe('0');
    fireEvent.keyDown(area, { key: 'End' });
    // The newest reading is 10 min old: at "now" the chart says there is no reading, not an old one.
    expect(screen.getByTestId('chart-readout').textContent).toBe(
      '12 Mar 12:00 · SpO₂ no reading · band 92–96 % · HR no reading · FiO₂ 0.50 High-flow nasal 40 L/min',
    );
    fireEvent.keyDown(area, { key: 'ArrowLeft' }); // a 120th of the window: 6 min
    expect(screen.getByTestId('chart-readout').textContent).toBe(
      '12 Mar 11:54 · SpO₂ 90 % below band, charted · band 92–96 % · HR 104/min · FiO₂ 0.50 High-flow nasal 40 L/min',
    );
    fireEvent.keyDown(area, { key: 'Home' });
    expect(screen.getByTestId('chart-readout').textContent).toContain('12 Mar 00:00 · SpO₂ no reading · band 94–98 %');
  });

  it('takes an extra set of marks on the SpO₂ panel', () => {
    const s = series();
    const { container } = render(
      <SaturationChart
        series={s}
        timeZone="Europe/London"
        hours={12}
        onHoursChange={() => {}}
        size={{ width: 800, height: 320 }}
        extraMarks={{ name: 'SaO₂ (blood gas)', marks: [{ key: 1, t: s.to - 3_600_000, v: 86, label: 'SaO₂ 86 %' }] }}
      />,
    );
    expect(container.querySelectorAll('[data-testid="panel-spo2"] [data-mark="extra"]')).toHaveLength(1);
    expect(screen.getByText('SaO₂ (blood gas)')).toBeTruthy();
  });

  it('renders without a size (ResponsiveContainer, zero size in jsdom) without throwing', () => {
    const warn = vi.spyOn(console, 'warn').mockImplementation(() => {});
    render(<SaturationChart series={series()} timeZone="Europe/London" hours={12} onHoursChange={() => {}} />);
    expect(screen.getByTestId('chart-summary').textContent).toMatch(/^SpO₂ over the last 12 h/);
    warn.mockRestore();
  });

  it('keeps the last chart with a stale notice when a refresh fails', () => {
    render(
      <SaturationChart
        series={series()}
        timeZone="Europe/London"
        hours={12}
        onHoursChange={() => {}}
        error={new Error('offline')}
        size={{ width: 800, height: 320 }}
      />,
    );
    expect(screen.getByRole('alert').textContent).toBe(
      'Could not refresh the chart — showing data from 12:00 (offline)',
    );
    expect(screen.getByTestId('chart-summary')).toBeTruthy();
  });

  it('finds the band in force and places axis ticks on the hour', () => {
    const s = series();
    expect(bandAt(s.bands, s.from + 3_600_000)).toMatchObject({ low: 94, high: 98 });
    expect(bandAt(s.bands, s.from + 2 * 3_600_000)).toMatchObject({ low: 92, high: 96 });
    expect(bandAt(s.bands, s.to + 1)).toBeNull();
    expect(timeTicks(T0 - 12 * 3_600_000 + 60_000, T0, 12)).toHaveLength(6);
  });
});

describe('DerivedFigures', () => {
  it('shows band time, burden, S/F with FiO₂ marked estimated, NEWS2 missing parts and imputed P/F', () => {
    render(<DerivedFigures derived={series().derived} timeZone="Europe/London" />);
    expect(screen.getByTestId('fig-in-band').textContent).toBe('Time in band75 %540 min of 720 min');
    expect(screen.getByTestId('fig-below').textContent).toContain('95 min');
    expect(screen.getByTestId('fig-above').textContent).toContain('15 min');
    expect(screen.getByTestId('fig-untrusted').textContent).toContain('30 min');
    expect(screen.getByTestId('fig-no-reading').textContent).toContain('40 min');
    expect(screen.getByTestId('fig-burden').textContent).toContain('310 %·min');
    expect(screen.getByTestId('fig-sf').textContent).toContain('180');
    expect(screen.getByTestId('fig-sf').textContent).toContain('FiO₂ 0.50 (estimated from device and flow)');
    expect(screen.queryByTestId('fig-rox')).toBeNull();
    const news2 = screen.getByTestId('fig-news2').textContent!;
    expect(news2).toContain('Scale 1');
    expect(news2).toContain('incomplete');
    expect(news2).toContain('missing: temperature, consciousness');
    expect(screen.getByTestId('fig-pf').textContent).toContain('116');
    expect(screen.getByTestId('fig-pf').textContent).toContain('PaO₂ about 58 mmHg');
  });

  it('shows ROX with its note, a complete NEWS2 with its response, and the P/F refusal note', () => {
    const d = series().derived;
    d.latest = {
      ...d.latest,
      device: 'high_flow_nasal',
      fio2Estimated: false,
      rox: 4.12,
      roxNote: 'ROX between 3.85 and 4.88 at 12 h: reassess',
      imputedPf: null,
      imputedPfNote: 'Not imputed: SpO₂ above 96 %',
      news2: { total: 6, complete: true, missing: [], response: 'medium', scale: 2, takenAt: d.latest.takenAt! },
    };
    render(<DerivedFigures derived={d} timeZone="Europe/London" />);
    expect(screen.getByTestId('fig-rox').textContent).toBe('ROX4.12ROX between 3.85 and 4.88 at 12 h: reassess');
    expect(screen.getByTestId('fig-news2').textContent).toContain('NEWS2 · Scale 2');
    expect(screen.getByTestId('fig-news2').textContent).toContain('Response: medium');
    expect(screen.getByTestId('fig-news2').textContent).not.toContain('missing');
    expect(screen.getByTestId('fig-pf').textContent).toContain('Not imputed: SpO₂ above 96 %');
    expect(screen.getByTestId('fig-sf').textContent).not.toContain('estimated');
  });
});
