import { describe, expect, it } from 'vitest';
import { signedIn } from '../support/app.ts';
import { openSignedIn, useBrowser } from '../support/browser.ts';
import { demoPatientId } from '../support/pages.ts';

const browser = useBrowser();

describe('ward board in a real browser', () => {
  it('shows the charge nurse the below-band bed first with its duration, follows new readings and says when data is stale', async () => {
    const { context, page } = await openSignedIn(browser, { as: 'charge@harbourside.example', path: '/board' });

    // Server-rendered first paint: tiles are there before any polling.
    const first = page.getByTestId('board-tiles').locator('li').first();
    // Below band — or, once the sweep has raised it, an urgent escalation of that same run.
    expect(['below_band', 'urgent_escalation']).toContain(await first.getAttribute('data-concern'));
    expect(await first.getAttribute('data-testid')).toBe('tile-4-01');
    // Below band now — or, once the seeded monitor readings are older than the unit's limit, what was last known.
    expect(await first.getByTestId('tile-reason').textContent()).toMatch(
      /^(Below band \d+ (min|h)|Was below band \d+)/,
    );
    expect(await first.getByTestId('tile-state').textContent()).toMatch(
      /^(below band \d+|was below band \d+ (min|h).* until \d\d:\d\d)/,
    );
    expect(await first.getByTestId('tile-age').textContent()).toMatch(/^\d+ % · (monitor|charted|imported)/); // the big number carries its age
    expect(await first.getByTestId('tile-sentence').textContent()).toContain('Bed 4-01');

    // A reading posted through the API shows up without a reload.
    const patientId = await demoPatientId('4-06');
    const nurse = await signedIn('nurse@harbourside.example');
    const res = await nurse.post(`/api/patients/${patientId}/observations`, {
      takenAt: new Date().toISOString(),
      spo2: 91,
      heartRate: 84,
      respRate: 16,
      device: 'room_air',
      trace: 'clean',
      systolic: 122,
      temperature: 36.9,
      consciousness: 'alert',
    });
    expect(res.status).toBe(201);
    const tile = page.getByTestId('tile-4-06');
    await page.waitForFunction(
      () =>
        document.querySelector('[data-testid="tile-4-06"] [data-testid="tile-spo2"]')?.textContent?.startsWith('91'),
      null,
      { timeout: 30_000 },
    );
    expect(await tile.getAttribute('data-state')).toBe('below');

    // The API stops answering: the last data stays, with a stale banner; it recovers on its own.
    await page.route('**/api/board**', (route) => route.abort('connectionrefused'));
    await page.getByTestId('stale-banner').waitFor({ state: 'visible', timeout: 40_000 });
    expect(await page.getByTestId('tile-4-01').count()).toBe(1);
    await page.unroute('**/api/board**');
    await page.getByTestId('stale-banner').waitFor({ state: 'detached', timeout: 40_000 });
    await context.close();
  });

  it('lets a nurse filter to their own beds', async () => {
    const { context, page } = await openSignedIn(browser, {
      as: 'nurse@harbourside.example',
      path: '/board',
      island: 'my-beds',
    });
    await page.getByTestId('my-beds').check();
    const labels = await page
      .getByTestId('board-tiles')
      .locator('li')
      .evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')));
    expect(labels.sort()).toEqual(['tile-4-01', 'tile-4-02', 'tile-4-03']);
    await context.close();
  });
});
